import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { z } from 'zod';
import type { SampleTrace } from '../../shared/schemas/traces';
import type { AppContext } from '../context';
import { DEMO_SAMPLE_DIR } from '../db/demo/field';
import { CableRun, Trace } from '../db/models';
import { AppError } from '../errors';
import { ApiRouter, handle } from '../http/api-router';

interface SampleEntry {
  file: string;
  title: string;
  run: string;
  end: 'A' | 'B';
}

/** The manifest's samples whose file is there; an unreadable manifest offers none. */
function sampleEntries(dir: string): SampleEntry[] {
  try {
    const raw = JSON.parse(fs.readFileSync(path.join(dir, 'manifest.json'), 'utf8')) as Array<Record<string, unknown>>;
    return raw
      .filter((e) => typeof e.file === 'string' && typeof e.run === 'string' && (e.end === 'A' || e.end === 'B'))
      .map((e) => ({
        file: path.basename(String(e.file)),
        title: String(e.title ?? e.file),
        run: String(e.run),
        end: e.end as 'A' | 'B',
      }))
      .filter((e) => fs.existsSync(path.join(dir, e.file)));
  } catch {
    return [];
  }
}

/**
 * Sample trace files to try an upload with, offered while the demo data is on: each a trace of a demo run the
 * seed left without one, so trying it gives a reading and not "already uploaded". Off the demo, none.
 */
export async function listSampleTraces(ctx: AppContext, dir = DEMO_SAMPLE_DIR): Promise<SampleTrace[]> {
  if (!ctx.config.demoData) return [];
  const out: SampleTrace[] = [];
  for (const e of sampleEntries(dir)) {
    const run = await CableRun.findOne({ where: { name: e.run }, include: [{ association: 'site' }] });
    if (!run) continue;
    const bytes = fs.readFileSync(path.join(dir, e.file));
    const sha256 = createHash('sha256').update(bytes).digest('hex');
    // Tried already (by anyone, not set aside): the upload would be refused as a copy, so the list links to that trace.
    const tried = await Trace.findOne({
      where: { cableRunId: run.id, end: e.end, sha256, archivedAt: null },
      order: [['id', 'DESC']],
      attributes: ['id'],
    });
    out.push({
      file: e.file,
      title: e.title,
      sizeBytes: bytes.length,
      siteId: run.siteId,
      siteName: run.site?.name ?? `site ${run.siteId}`,
      cableRunId: run.id,
      cableRunName: run.name,
      end: e.end,
      endLabel: e.end === 'A' ? run.endALabel : run.endBLabel,
      triedAsTraceId: tried?.id ?? null,
    });
  }
  return out;
}

const FileParam = z.object({ file: z.string().max(200) });

export function sampleTraceRoutes(ctx: AppContext, dir = DEMO_SAMPLE_DIR) {
  const r = new ApiRouter('/api/sample-traces');
  r.get(
    '/',
    'traces:upload',
    handle(async () => ({ items: await listSampleTraces(ctx, dir) })),
  );
  r.get(
    '/:file',
    'traces:upload',
    handle((req, res) => {
      const { file } = FileParam.parse(req.params);
      const entry = ctx.config.demoData ? sampleEntries(dir).find((e) => e.file === file) : undefined;
      if (!entry) throw AppError.notFound(`Sample trace ${file}`);
      res.set({ 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="${entry.file}"` });
      res.send(fs.readFileSync(path.join(dir, entry.file)));
      return undefined;
    }),
  );
  return r;
}
