import { useEffect, useRef, useState, type FormEvent } from 'react';
import { TraceUploadSchema, type TraceSettings } from '../../../../shared/schemas/traces';
import { summariseDeviceAnalysis } from '../../../../shared/offline/device-summary';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { SelectField, TextField } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { fromUnit, type LengthUnit } from '../../../lib/format';
import { WhereCard } from '../../traces/components/where-card';
import { formatFileSize } from '../../traces/components/file-size';
import { analyseOnDevice, startEngine } from '../analyse-on-device';
import { analysisCableOf } from '../cable-values';
import { useDevice } from '../device-context';
import type { UploadItem } from '../outbox-machine';

const LAST = 'rholog.device.last';

function remembered(): { siteId?: string; runId?: string; end?: 'A' | 'B' } {
  try {
    return JSON.parse(localStorage.getItem(LAST) ?? '{}');
  } catch {
    return {};
  }
}

/** The test lead typed in the reader's unit, sent in metres; text that is not a number goes as typed, to be named. */
function leadInMetres(typed: string, unit: LengthUnit): string {
  const v = Number(typed.trim().replace(',', '.'));
  return typed.trim() !== '' && Number.isFinite(v) ? String(fromUnit(v, unit)) : typed;
}

/** A fresh idempotency key for one upload: it stays with the file through every try. */
const newKey = () => `device-${crypto.randomUUID()}`;

/**
 * Where the trace was taken and which file: read from the field data kept on
 * the phone, analysed here by the engine in a worker, and put in the outbox
 * with its settings and the raw bytes.
 */
export function DeviceAnalyseForm({
  unit,
  onAnalysed,
  initial,
}: {
  unit: LengthUnit;
  onAnalysed: (id: string) => void;
  /** What was already chosen on the upload page before the signal went; else what this phone used last. */
  initial?: { siteId?: string; runId?: string; end?: 'A' | 'B'; file?: File };
}) {
  const d = useDevice();
  const last = initial?.siteId ? initial : remembered();
  const [siteId, setSiteId] = useState(last.siteId ?? '');
  const [runId, setRunId] = useState(last.runId ?? '');
  const [end, setEnd] = useState<'A' | 'B' | ''>(last.end ?? '');
  const [file, setFile] = useState<File | null>(initial?.file ?? null);
  const [settings, setSettings] = useState({
    mode: 'auto',
    pulseWidthNs: '',
    zeroOffsetNs: '',
    leadLengthM: '',
    sampleIntervalNs: '',
  });
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [busy, setBusy] = useState(false);
  const [failure, setFailure] = useState<string | null>(null);
  const input = useRef<HTMLInputElement>(null);
  // Load the engine now, while there may still be signal.
  useEffect(() => void startEngine(), []);

  const sites = d.field?.sites ?? [];
  const runs = (d.field?.runs ?? []).filter((r) => String(r.siteId) === siteId);
  const run = runs.find((r) => String(r.id) === runId);
  const cable = run ? d.field?.cables.find((c) => c.id === run.cableTypeId) : undefined;

  // Said under the button while it cannot be pressed, so nobody is left guessing why it is grey.
  const missing = [
    !run && (siteId ? 'the cable run' : 'the site and cable run'),
    run && !cable && 'the cable type of this run, which is not in the field data on this phone',
    !end && 'the end the instrument is connected at',
    !file && 'a trace file',
  ].filter((m): m is string => !!m);

  const submit = async (e: FormEvent) => {
    e.preventDefault();
    if (!run || !end || !file || !cable) return;
    const fields: Record<string, string> = {
      cableRunId: String(run.id),
      end,
      ...settings,
      leadLengthM: leadInMetres(settings.leadLengthM, unit),
    };
    // The server's own rules for the form, so what the phone accepts the server accepts too.
    const checked = TraceUploadSchema.safeParse(fields);
    if (!checked.success) {
      setErrors(Object.fromEntries(checked.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    setFailure(null);
    setBusy(true);
    try {
      localStorage.setItem(LAST, JSON.stringify({ siteId, runId, end }));
      const v = checked.data;
      const traceSettings: TraceSettings = { mode: v.mode };
      if (v.pulseWidthNs !== undefined) traceSettings.pulseWidthNs = v.pulseWidthNs;
      if (v.zeroOffsetNs !== undefined) traceSettings.zeroOffsetNs = v.zeroOffsetNs;
      if (v.leadLengthM !== undefined) traceSettings.leadLengthM = v.leadLengthM;
      if (v.sampleIntervalNs !== undefined) traceSettings.sampleIntervalNs = v.sampleIntervalNs;
      const bytes = await file.arrayBuffer();
      const done = await analyseOnDevice(bytes, traceSettings, analysisCableOf(cable));
      const analysis = done.outcome.analysis;
      const now = new Date();
      const item: UploadItem = {
        kind: 'upload',
        id: crypto.randomUUID(),
        key: newKey(),
        userId: d.user.id,
        userName: d.user.name,
        createdAt: now.toISOString(),
        state: 'queued',
        attempts: 0,
        lastAttemptAt: null,
        nextAttemptAt: null,
        problem: null,
        sentAt: null,
        fileName: file.name,
        bytes,
        sizeBytes: bytes.byteLength,
        fields: Object.fromEntries(Object.entries(fields).filter(([, value]) => value !== '')),
        where: {
          siteId: run.siteId,
          siteName: run.siteName,
          cableRunId: run.id,
          cableRunName: run.name,
          end,
          endLabel: end === 'A' ? run.endALabel : run.endBLabel,
        },
        analysis,
        deviceError: done.outcome.error?.message ?? null,
        summary: analysis ? summariseDeviceAnalysis(analysis, { analysedAt: now, cableTypeRevision: cable.revision }) : null,
        result: null,
        analysedMs: done.elapsedMs,
        sampleCount: done.sampleCount,
      };
      await d.enqueue([item]);
      setFile(null);
      onAnalysed(item.id);
    } catch (err) {
      setFailure((err as Error).message);
    } finally {
      setBusy(false);
    }
  };

  if (!d.field) {
    return (
      <Notice tone="warn" title="No field data on this phone yet">
        Open Rholog once with signal after signing in: it keeps the sites, cable runs and cable library here for working offline.
      </Notice>
    );
  }

  return (
    <form onSubmit={(e) => void submit(e)} className="space-y-4" aria-label="Analyse a trace on this phone">
      <WhereCard
        sites={sites}
        runs={runs}
        siteId={siteId}
        runId={runId}
        onSite={(id) => (setSiteId(id), setRunId(''))}
        onRun={setRunId}
        runError={errors.cableRunId}
        run={run}
        cable={cable}
        unit={unit}
        end={end}
        onEnd={setEnd}
      />

      <Card title="2. Trace file">
        <Button variant="secondary" className="min-h-14 w-full text-base sm:w-auto" onClick={() => input.current?.click()}>
          Choose the CSV from the instrument
        </Button>
        <input
          ref={input}
          type="file"
          accept=".csv,text/csv,text/comma-separated-values,application/vnd.ms-excel"
          className="sr-only"
          tabIndex={-1}
          aria-label="Trace file"
          onChange={(e) => (setFile(e.target.files?.[0] ?? null), (e.target.value = ''))}
        />
        {file && (
          <p className="mt-3 flex justify-between gap-2 rounded-md border border-rule px-3 py-2 text-sm">
            <span className="truncate font-semibold">{file.name}</span>
            <span className="text-mist tabular" data-testid="device-file-size">
              {formatFileSize(file.size)}
            </span>
          </p>
        )}
      </Card>

      <Card>
        <details>
          <summary className="min-h-11 cursor-pointer py-2 text-lg font-semibold">3. Instrument settings (optional)</summary>
          <div className="mt-3 grid gap-3 sm:grid-cols-2">
            <SelectField
              label="Trace kind"
              value={settings.mode}
              onChange={(e) => setSettings({ ...settings, mode: e.target.value })}
            >
              <option value="auto">Tell from the trace</option>
              <option value="step">Step</option>
              <option value="pulse">Pulse</option>
            </SelectField>
            <TextField
              label="Pulse width (ns)"
              inputMode="decimal"
              value={settings.pulseWidthNs}
              error={errors.pulseWidthNs}
              onChange={(e) => setSettings({ ...settings, pulseWidthNs: e.target.value })}
            />
            <TextField
              label="Zero offset (ns)"
              inputMode="decimal"
              value={settings.zeroOffsetNs}
              error={errors.zeroOffsetNs}
              onChange={(e) => setSettings({ ...settings, zeroOffsetNs: e.target.value })}
            />
            <TextField
              label={`Test-lead length (${unit})`}
              inputMode="decimal"
              value={settings.leadLengthM}
              error={errors.leadLengthM}
              onChange={(e) => setSettings({ ...settings, leadLengthM: e.target.value })}
            />
            <TextField
              label="Sample interval (ns)"
              hint="Only for files with a single amplitude column"
              inputMode="decimal"
              value={settings.sampleIntervalNs}
              error={errors.sampleIntervalNs}
              onChange={(e) => setSettings({ ...settings, sampleIntervalNs: e.target.value })}
            />
          </div>
        </details>
      </Card>

      {failure && (
        <Notice tone="danger" title="The phone could not analyse the file">
          {failure}
        </Notice>
      )}
      <Button
        type="submit"
        className="min-h-14 w-full text-lg"
        disabled={missing.length > 0 || busy}
        aria-describedby={missing.length > 0 ? 'device-analyse-missing' : undefined}
      >
        {busy ? 'Analysing on this phone…' : 'Analyse on this phone'}
      </Button>
      {missing.length > 0 && (
        <p id="device-analyse-missing" className="text-center text-sm text-ink-soft" data-testid="device-analyse-missing">
          Still needed: {missing.join(', ').replace(/, ([^,]*)$/, ' and $1')}.
        </p>
      )}
    </form>
  );
}
