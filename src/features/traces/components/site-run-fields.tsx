import { SelectField } from '../../../components/ui/field';

interface Named {
  id: number | string;
  name: string;
}

/**
 * The "where" pair every trace form starts with: the site, then one of its cable runs. Choosing another site
 * clears the run (`onSite` is expected to do so), and the run list stays disabled until a site is chosen.
 */
export function SiteRunFields({
  sites,
  runs,
  siteId,
  runId,
  onSite,
  onRun,
  runError,
}: {
  sites: readonly Named[];
  runs: readonly Named[];
  siteId: string;
  /** The chosen run's id, or '' while none of `runs` is chosen. */
  runId: string;
  onSite: (siteId: string) => void;
  onRun: (runId: string) => void;
  runError?: string;
}) {
  return (
    <div className="grid gap-3 sm:grid-cols-2">
      <SelectField label="Site" value={siteId} onChange={(e) => onSite(e.target.value)} required>
        <option value="">Choose a site…</option>
        {sites.map((s) => (
          <option key={s.id} value={s.id}>
            {s.name}
          </option>
        ))}
      </SelectField>
      <SelectField label="Cable run" value={runId} onChange={(e) => onRun(e.target.value)} disabled={!siteId} error={runError} required>
        <option value="">{siteId ? 'Choose a cable run…' : 'Choose the site first'}</option>
        {runs.map((r) => (
          <option key={r.id} value={r.id}>
            {r.name}
          </option>
        ))}
      </SelectField>
    </div>
  );
}
