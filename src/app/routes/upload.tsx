import { useRef, useState, type DragEvent, type FormEvent } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { ApiError, describeError, type FieldLabels } from '../../lib/api-client';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { fieldErrors, SelectField, TextField } from '../../components/ui/field';
import { Notice } from '../../components/ui/notice';
import { SafetyCaution } from '../../components/ui/safety-caution';
import { useCableRuns } from '../../features/sites/api/list-cable-runs';
import { useSites } from '../../features/sites/api/list-sites';
import { useSampleTraces } from '../../features/traces/api/list-sample-traces';
import { useUploadTraces } from '../../features/traces/api/upload-traces';
import { WhereCard } from '../../features/traces/components/where-card';
import { formatFileSize } from '../../features/traces/components/file-size';
import { SampleTraces } from '../../features/traces/components/sample-traces';
import { fileAtFault, sameBytes, UploadOutcome } from '../../features/traces/components/upload-outcome';
import { fromUnit, lengthsInText } from '../../lib/format';
import { useSession } from '../../features/auth/use-session';
import { useDevice, useOnline } from '../../features/offline/device-context';
import { paths } from '../paths';

const LAST = 'rholog.upload.last';

/** What this form calls each field the server may name in an error. */
const LABELS: FieldLabels = {
  cableRunId: 'Cable run',
  end: 'Instrument connected at',
  mode: 'Trace kind',
  pulseWidthNs: 'Pulse width',
  zeroOffsetNs: 'Zero offset',
  leadLengthM: 'Test-lead length',
  sampleIntervalNs: 'Sample interval',
  vfOverride: 'Velocity factor override',
  vfOverrideReason: 'Reason for the override',
};

/** The test lead typed in the reader's unit, sent in metres; text that is not a number goes as typed, for the server to name. */
function leadInMetres(typed: string, unit: 'm' | 'ft'): string {
  const v = Number(typed.trim().replace(',', '.'));
  return typed.trim() !== '' && Number.isFinite(v) ? String(fromUnit(v, unit)) : typed;
}

function remembered(): { siteId?: string; runId?: string; end?: 'A' | 'B' } {
  try {
    return JSON.parse(localStorage.getItem(LAST) ?? '{}');
  } catch {
    return {};
  }
}

export function UploadPage() {
  const { unit } = useSession();
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const last = remembered();
  const [siteId, setSiteId] = useState(params.get('site') ?? last.siteId ?? '');
  const [runId, setRunId] = useState(params.get('run') ?? last.runId ?? '');
  const [end, setEnd] = useState<'A' | 'B' | ''>((params.get('end') as 'A' | 'B') ?? last.end ?? '');
  const [files, setFiles] = useState<File[]>([]);
  const [settings, setSettings] = useState({ mode: 'auto', pulseWidthNs: '', zeroOffsetNs: '', leadLengthM: '', sampleIntervalNs: '', vfOverride: '', vfOverrideReason: '' });
  const [progress, setProgress] = useState<number | null>(null);
  const [dragging, setDragging] = useState(false);
  // Files just refused for what is in them (unreadable, not a CSV, too large, already uploaded): not taken again.
  const [refused, setRefused] = useState<Array<{ file: File; why: string }>>([]);
  const [skipped, setSkipped] = useState<string[]>([]);
  const input = useRef<HTMLInputElement>(null);
  const sites = useSites({ pageSize: 100 });
  const runs = useCableRuns({ siteId: Number(siteId) }, !!siteId);
  const upload = useUploadTraces();
  const online = useOnline();
  const device = useDevice();
  const samples = useSampleTraces(online);
  // Without signal the server's lists cannot load: choose from the sites and runs kept on the phone instead.
  const kept = !online ? device.field : null;
  const siteItems = kept ? kept.sites : (sites.data?.items ?? []);
  const runItems = kept ? kept.runs.filter((r) => String(r.siteId) === siteId) : (runs.data?.items ?? []);
  const run = runItems.find((r) => String(r.id) === runId);
  const errors = fieldErrors(upload.error, unit);
  // Said under the button while it cannot be pressed, so nobody is left guessing why it is grey.
  const missing = [
    !run && (siteId ? 'the cable run' : 'the site and cable run'),
    !end && 'the end the instrument is connected at',
    !files.length && 'a trace file',
    // Sending without signal can only fail: the button waits, and the notice above offers the phone's own analysis.
    !online && 'a signal to reach Rholog (or analyse the trace on this phone instead)',
  ].filter((m): m is string => !!m);

  // The phone's own analysis, carrying what is chosen so far: nothing to choose twice with gloves on.
  const analyseHere = (className: string) => (
    <Link to={paths.deviceAnalyse.to(undefined, { site: siteId, run: run ? runId : '', end })} state={files.length === 1 ? { file: files[0] } : undefined} className={className}>
      Analyse the trace on this phone
    </Link>
  );

  const addFiles = async (list: FileList | null) => {
    if (!list) return;
    const picked = Array.from(list);
    const next = [...files];
    const again: string[] = [];
    for (const f of picked) {
      let earlier: { why: string } | undefined;
      for (const r of refused) if (await sameBytes(r.file, f)) earlier = r;
      if (earlier) again.push(`${f.name} (${earlier.why})`);
      else if (!next.some((x) => x.name === f.name && x.size === f.size)) next.push(f);
    }
    setSkipped(again);
    // Re-choosing only a refused file keeps what the last upload said (and its links).
    if (next.length === files.length) return;
    setFiles(next);
    upload.reset();
  };
  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setDragging(false);
    addFiles(e.dataTransfer.files);
  };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!files.length || !run || !end) return;
    localStorage.setItem(LAST, JSON.stringify({ siteId, runId, end }));
    setProgress(0);
    upload.mutate(
      { files, fields: { cableRunId: runId, end, ...settings, leadLengthM: leadInMetres(settings.leadLengthM, unit) }, onProgress: setProgress },
      {
        onSuccess: (r) => {
          setFiles([]);
          // Read, or large and analysed in the background (its page says "Analysing…" until the result is in).
          const ok = r.traces.filter((t) => t.status !== 'failed');
          if (r.traces.length === 1 && ok.length === 1 && r.duplicates.length === 0) navigate(paths.trace.to(ok[0].id));
        },
        onError: (err) => {
          if (!fileAtFault(err)) return;
          // The same bytes would be refused again (or stored as another unreadable copy): clear them from the form.
          const why = err instanceof ApiError && err.code === 'duplicate_upload' ? 'already uploaded for this run and end' : 'it was just refused';
          setRefused([...refused, ...files.map((file) => ({ file, why }))]);
          setFiles([]);
        },
        onSettled: () => setProgress(null),
      },
    );
  };

  const failedStored = upload.error instanceof ApiError ? ((upload.error.body?.traces as unknown[] | undefined) ?? []) : [];

  return (
    <>
      <PageHeader title="Upload a trace" subtitle="Choose where you measured from, add the CSV from the instrument, and read where the fault is." />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <form onSubmit={submit} className="space-y-4" aria-label="Upload traces">
          {!online && (
            <div data-testid="upload-offline">
              <Notice tone="warn" title="No signal: this page needs the server">
                <p>The phone can read the trace now, with the fault's distance and route position, and send it when the signal is back.</p>
                {analyseHere('mt-2 inline-flex min-h-11 items-center rounded-md bg-copper px-4 font-semibold text-white hover:bg-copper-dark')}
              </Notice>
            </div>
          )}
          {/* Above the form, not between its steps: trying a sample fills them all in. */}
          {online && files.length === 0 && (
            <SampleTraces
              samples={samples.data?.items ?? []}
              traceLink={paths.trace.to}
              onTry={(s, file) => {
                setSiteId(String(s.siteId));
                setRunId(String(s.cableRunId));
                setEnd(s.end);
                setFiles([file]);
                setSkipped([]);
                upload.reset();
              }}
            />
          )}

          <WhereCard
            sites={siteItems}
            runs={runItems}
            siteId={siteId}
            runId={runId}
            onSite={(id) => (setSiteId(id), setRunId(''))}
            onRun={setRunId}
            runError={errors.cableRunId}
            run={run}
            cable={run?.cableType}
            unit={unit}
            end={end}
            onEnd={setEnd}
            endError={errors.end}
          />

          <Card title="2. Trace files">
            <div
              onDragOver={(e) => (e.preventDefault(), setDragging(true))}
              onDragLeave={() => setDragging(false)}
              onDrop={onDrop}
              className={`rounded-lg border-2 border-dashed p-5 text-center ${dragging ? 'border-copper bg-copper-light' : 'border-rule'}`}
              data-testid="drop-area"
            >
              <p className="text-sm text-ink-soft">Drop CSV files here, or</p>
              <Button variant="secondary" className="mt-2 min-h-14 w-full text-base sm:w-auto" onClick={() => input.current?.click()}>
                Choose trace files
              </Button>
              <input
                ref={input}
                type="file"
                multiple
                accept=".csv,text/csv,text/comma-separated-values,application/vnd.ms-excel"
                className="sr-only"
                tabIndex={-1}
                aria-label="Trace files"
                onChange={(e) => (addFiles(e.target.files), (e.target.value = ''))}
              />
            </div>
            {files.length > 0 && (
              <ul className="mt-3 divide-y divide-rule rounded-md border border-rule">
                {files.map((f) => (
                  <li key={f.name + f.size} className="flex items-center justify-between gap-2 px-3 py-2 text-sm">
                    <span className="min-w-0 truncate font-semibold">{f.name}</span>
                    {/* The size keeps to one line ("31 kB", not "31" over "kB"): the name gives way instead. */}
                    <span className="flex shrink-0 items-center gap-2 whitespace-nowrap text-mist tabular">
                      <span data-testid="upload-file-size">{formatFileSize(f.size)}</span>
                      <Button variant="ghost" aria-label={`Remove ${f.name}`} onClick={() => setFiles(files.filter((x) => x !== f))}>
                        Remove
                      </Button>
                    </span>
                  </li>
                ))}
              </ul>
            )}
            {errors.file && !failedStored.length && <p className="mt-2 text-sm font-semibold text-danger">{errors.file}</p>}
            {skipped.length > 0 && (
              <p className="mt-2 text-sm font-semibold text-warn" role="status" data-testid="upload-skipped">
                Not added again: {skipped.join('; ')}. Choose a different file.
              </p>
            )}
          </Card>

          <Card>
            <details>
              <summary className="min-h-11 cursor-pointer py-2 text-lg font-semibold">3. Instrument settings (optional)</summary>
              <div className="mt-3 grid gap-3 sm:grid-cols-2">
                <SelectField label="Trace kind" value={settings.mode} onChange={(e) => setSettings({ ...settings, mode: e.target.value })}>
                  <option value="auto">Tell from the trace</option>
                  <option value="step">Step</option>
                  <option value="pulse">Pulse</option>
                </SelectField>
                <TextField label="Pulse width (ns)" inputMode="decimal" value={settings.pulseWidthNs} error={errors.pulseWidthNs} onChange={(e) => setSettings({ ...settings, pulseWidthNs: e.target.value })} />
                <TextField label="Zero offset (ns)" hint="Time on the trace to count as the cable's start" inputMode="decimal" value={settings.zeroOffsetNs} error={errors.zeroOffsetNs} onChange={(e) => setSettings({ ...settings, zeroOffsetNs: e.target.value })} />
                <TextField label={`Test-lead length (${unit})`} inputMode="decimal" value={settings.leadLengthM} error={errors.leadLengthM} onChange={(e) => setSettings({ ...settings, leadLengthM: e.target.value })} />
                <TextField label="Sample interval (ns)" hint="Only for files with a single amplitude column" inputMode="decimal" value={settings.sampleIntervalNs} error={errors.sampleIntervalNs} onChange={(e) => setSettings({ ...settings, sampleIntervalNs: e.target.value })} />
                <TextField label="Velocity factor override" hint={run ? `Library value ${run.cableType.vf}` : undefined} inputMode="decimal" value={settings.vfOverride} error={errors.vfOverride} onChange={(e) => setSettings({ ...settings, vfOverride: e.target.value })} />
                {settings.vfOverride && (
                  <TextField label="Why override the velocity factor?" value={settings.vfOverrideReason} error={errors.vfOverrideReason} onChange={(e) => setSettings({ ...settings, vfOverrideReason: e.target.value })} />
                )}
              </div>
            </details>
          </Card>

          {progress !== null && (
            <div aria-live="polite">
              <progress className="h-4 w-full accent-copper" max={1} value={progress} aria-label="Upload progress" />
              <p className="text-sm tabular">{progress < 1 ? `Sending… ${Math.round(progress * 100)} %` : 'Analysing…'}</p>
            </div>
          )}
          <UploadOutcome error={upload.error} data={upload.data} describe={(err) => lengthsInText(describeError(err, LABELS), unit)} traceLink={paths.trace.to} />
          <Button
            type="submit"
            className="min-h-14 w-full text-lg"
            disabled={missing.length > 0 || upload.isPending}
            aria-describedby={missing.length > 0 ? 'upload-missing' : undefined}
          >
            {upload.isPending ? 'Uploading…' : files.length > 1 ? `Upload ${files.length} traces` : 'Upload and analyse'}
          </Button>
          {missing.length > 0 && (
            <p id="upload-missing" className="text-center text-sm text-ink-soft" data-testid="upload-missing">
              Still needed: {missing.join(', ').replace(/, ([^,]*)$/, ' and $1')}.
            </p>
          )}
          {/* Without signal the way on stands where the thumb already is, not only in the notice at the top. */}
          {!online && (
            <div data-testid="upload-offline-next">
              {analyseHere('flex min-h-14 w-full items-center justify-center rounded-md bg-copper px-4 text-lg font-semibold text-white hover:bg-copper-dark')}
            </div>
          )}
        </form>
        <div className="order-first space-y-4 lg:order-none">
          <SafetyCaution compact />
        </div>
      </div>
    </>
  );
}
export default UploadPage;
