import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { SampleTrace } from '../../../../shared/schemas/traces';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { describeError } from '../../../lib/api-client';
import { fetchSampleTrace } from '../api/list-sample-traces';
import { formatFileSize } from './file-size';

/**
 * While the demo data is on, sample traces to try the upload with: each is a trace of a demo run that has none
 * yet, so "Try this sample" fills in where it was taken and adds the file, and the upload gives a reading.
 */
export function SampleTraces({
  samples,
  onTry,
  traceLink,
}: {
  samples: SampleTrace[];
  onTry: (sample: SampleTrace, file: File) => void;
  traceLink: (traceId: number) => string;
}) {
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  if (!samples.length) return null;
  const tryIt = async (s: SampleTrace) => {
    setBusy(s.file);
    setError(null);
    try {
      onTry(s, await fetchSampleTrace(s));
    } catch (err) {
      setError(`${s.file} could not be fetched: ${describeError(err)}`);
    } finally {
      setBusy(null);
    }
  };
  return (
    <Card title="No trace file to hand?">
      <p className="text-sm text-ink-soft">
        The demo data is on: try the upload with one of these sample traces, taken on demo cable runs that have no trace yet.
        Trying one fills in the site, the cable run and the end for you.
      </p>
      <ul className="mt-3 space-y-3" data-testid="sample-traces">
        {samples.map((s) => (
          <li key={s.file} className="rounded-md border border-rule p-3 text-sm">
            <p className="font-semibold">{s.title}</p>
            <p className="mt-1 text-ink-soft">
              {s.siteName} · {s.cableRunName} · from end {s.end} ({s.endLabel}) · {formatFileSize(s.sizeBytes)}
            </p>
            <div className="mt-2 flex flex-wrap items-center gap-2">
              {s.triedAsTraceId ? (
                <p className="text-ink-soft">
                  Already uploaded from this end:{' '}
                  <Link
                    to={traceLink(s.triedAsTraceId)}
                    className="inline-flex min-h-11 items-center font-semibold text-teal underline"
                  >
                    open trace {s.triedAsTraceId}
                  </Link>
                </p>
              ) : (
                // The file's name is spoken after the words on the button (not instead of them), so a
                // voice command of what the button says finds it and each sample's button is told apart.
                <Button variant="secondary" onClick={() => void tryIt(s)} disabled={busy !== null}>
                  {busy === s.file ? 'Fetching…' : 'Try this sample'}
                  {' '}<span className="sr-only">{s.file}</span>
                </Button>
              )}
              <a
                href={`/api/sample-traces/${encodeURIComponent(s.file)}`}
                download={s.file}
                className="inline-flex min-h-11 items-center px-2 text-teal underline"
              >
                Download the CSV{' '}<span className="sr-only">{s.file}</span>
              </a>
            </div>
          </li>
        ))}
      </ul>
      {error && (
        <p className="mt-2 text-sm font-semibold text-danger" role="alert">
          {error}
        </p>
      )}
    </Card>
  );
}
