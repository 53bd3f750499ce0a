import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { fieldErrors, TextField } from '../../components/ui/field';
import { Badge, ErrorNotice, Notice } from '../../components/ui/notice';
import { useSession } from '../../features/auth/use-session';
import { CABLE_EXPORT_URL, useCommitCableImport, usePreviewCableImport, type ImportAction } from '../../features/cables/api/import-cables';
import { FIELD_LABELS, formatFieldValue } from '../../features/cables/cable-format';
import { paths } from '../paths';

const ACTION: Record<ImportAction, { label: string; tone: 'ok' | 'info' | 'plain' | 'danger' }> = {
  create: { label: 'New', tone: 'ok' },
  update: { label: 'Changes', tone: 'info' },
  unchanged: { label: 'Unchanged', tone: 'plain' },
  invalid: { label: 'Error', tone: 'danger' },
};

const NEEDED_COLUMNS = 'name, construction, dielectric, z0_ohm, vf, vf_tolerance, vf_source, vf_reference';
const OPTIONAL_COLUMNS =
  'notes, attenuation_db_per_100m, attenuation_freq_mhz, attenuation_points, loss_source, r_dc_ohm_per_m, skin_ohm_per_m_root_hz, l_h_per_m, c_f_per_m, g_s_per_m, loss_tangent, pulse_vfs';

/** Upload a CSV, see every row checked, then write it all in one go — or nothing. */
export function CableImportPage() {
  const { unit } = useSession();
  const [file, setFile] = useState<File | null>(null);
  const [reason, setReason] = useState('');
  const preview = usePreviewCableImport();
  const commit = useCommitCableImport();
  const commitErrors = fieldErrors(commit.error);

  const choose = (f: File | null) => {
    setFile(f);
    commit.reset();
    if (f) preview.mutate(f);
    else preview.reset();
  };

  const p = preview.data;
  return (
    <>
      <PageHeader title="Import the cable library" subtitle="Check a CSV row by row before anything is written; the import writes every row or none." />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
        <Card title="1. Choose the file" className="min-w-0">
          <label className="block text-sm font-semibold text-ink-soft" htmlFor="cable-csv">
            CSV file
          </label>
          <input
            id="cable-csv"
            type="file"
            accept=".csv,text/csv"
            className="mt-1 block min-h-11 w-full rounded-md border border-rule bg-white px-3 py-2 text-sm"
            onChange={(e) => choose(e.target.files?.[0] ?? null)}
          />
          <p className="mt-2 text-xs text-mist">
            Needed columns: {NEEDED_COLUMNS}. Optional: {OPTIONAL_COLUMNS}. Cells separated by commas, or by semicolons with a decimal comma as many spreadsheets save them. SI units; tolerance as a fraction
            (0.02 for ±2 %). Rows are matched to the library by name. The{' '}
            <a href={CABLE_EXPORT_URL} className="text-teal underline" download>
              export
            </a>{' '}
            has the same layout.
          </p>
          {preview.isPending && <p className="mt-3 text-sm text-mist">Checking…</p>}
          {preview.error && (
            <div className="mt-3">
              <ErrorNotice error={preview.error} />
            </div>
          )}
        </Card>
        <Card title="2. Import" className="min-w-0">
          {p ? (
            <>
              <p className="text-sm tabular" data-testid="import-counts">
                {p.counts.create} new · {p.counts.update} with changes · {p.counts.unchanged} unchanged · <span className={p.counts.invalid ? 'font-bold text-danger' : ''}>{p.counts.invalid} with errors</span>
              </p>
              {p.counts.invalid > 0 && (
                <Notice tone="danger" className="mt-3" title="Fix the rows with errors first">
                  Nothing will be written while any row has an error. Lines {p.rows.filter((r) => r.action === 'invalid').map((r) => r.line).join(', ')}.
                </Notice>
              )}
              <div className="mt-3 space-y-3">
                <TextField label="Reason (kept in each entry's history)" value={reason} onChange={(e) => setReason(e.target.value)} error={commitErrors.reason} />
                <Button disabled={!p.canCommit || commit.isPending || !file} onClick={() => file && commit.mutate({ file, reason })}>
                  Import {p.counts.create + p.counts.update} row{p.counts.create + p.counts.update === 1 ? '' : 's'}
                </Button>
              </div>
              {commit.error && !commitErrors.reason && (
                <div className="mt-3">
                  <ErrorNotice error={commit.error} />
                </div>
              )}
              {commit.isSuccess && (
                <Notice tone="ok" className="mt-3" title="Imported">
                  {commit.data.counts.create} added and {commit.data.counts.update} changed. <Link to={paths.cables.to()} className="text-teal underline">Open the library</Link>
                </Notice>
              )}
            </>
          ) : preview.isPending ? (
            <p className="text-sm text-mist">Checking the file…</p>
          ) : preview.error ? (
            <p className="text-sm text-ink-soft" data-testid="import-blocked">
              Nothing can be imported from this file: fix what the message beside it says, save the file and choose it again.
            </p>
          ) : (
            <p className="text-sm text-mist">Choose a file to see the check.</p>
          )}
        </Card>
      </div>
      {p && (
        <Card title="The check, row by row" className="mt-4">
          <div className="overflow-x-auto">
            <table className="w-full min-w-[40rem] text-left text-sm" aria-label="Import check">
              <thead className="text-xs uppercase text-mist">
                <tr>
                  <th className="py-2 pr-3">Line</th>
                  <th className="pr-3">Name</th>
                  <th className="pr-3">Result</th>
                  <th>Details</th>
                </tr>
              </thead>
              <tbody>
                {p.rows.map((r) => (
                  <tr key={r.line} className={`border-t border-rule align-top ${r.action === 'invalid' ? 'bg-danger-light/40' : ''}`} data-testid={`import-row-${r.line}`}>
                    <td className="py-2 pr-3 tabular">{r.line}</td>
                    <td className="py-2 pr-3 font-semibold">{r.name || '(no name)'}</td>
                    <td className="py-2 pr-3">
                      <Badge tone={ACTION[r.action].tone}>{ACTION[r.action].label}</Badge>
                    </td>
                    <td className="py-2">
                      {r.errors.length > 0 ? (
                        <ul className="space-y-0.5 text-danger">
                          {r.errors.map((e, i) => (
                            <li key={i}>
                              <span className="font-semibold">{e.field === '(row)' ? 'The row' : `Column ${e.field}`}</span> {e.message}
                            </li>
                          ))}
                        </ul>
                      ) : r.action === 'update' ? (
                        <ul className="space-y-0.5">
                          {r.changes.map((c) => (
                            <li key={c.field}>
                              {FIELD_LABELS[c.field] ?? c.field}: <span className="text-mist">{formatFieldValue(c.field, c.from, unit)}</span> → {formatFieldValue(c.field, c.to, unit)}
                            </li>
                          ))}
                        </ul>
                      ) : r.action === 'create' ? (
                        <span className="text-mist">Added as a new entry</span>
                      ) : (
                        <span className="text-mist">Same as the library</span>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </Card>
      )}
    </>
  );
}
export default CableImportPage;
