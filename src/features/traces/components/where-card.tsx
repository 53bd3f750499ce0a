import { Card } from '../../../components/ui/card';
import { countOf, formatLength, type LengthUnit } from '../../../lib/format';
import { EndPicker } from './end-picker';
import { SiteRunFields } from './site-run-fields';

interface Named {
  id: number | string;
  name: string;
}

export interface WhereRun {
  installedLengthM: number;
  endALabel: string;
  endBLabel: string;
  markers: readonly unknown[];
}

/** The chosen run in one line: its cable's velocity factor, installed length and route markers. */
export function runSummary(run: WhereRun, cable: { name: string; vf: number; vfTolerance: number } | null | undefined, unit: LengthUnit): string {
  const kind = cable ? `${cable.name} · VF ${cable.vf.toFixed(3)} ± ${(cable.vfTolerance * 100).toFixed(1)} %` : 'Its cable type is not in the library kept on this phone';
  return `${kind} · installed ${formatLength(run.installedLengthM, unit)} · ${countOf(run.markers.length, 'route marker')}`;
}

/**
 * "1. Where" of every trace form, the upload and the phone's own analysis alike: the site, its cable run, the
 * run in one line, and the end the instrument is connected at.
 */
export function WhereCard({
  sites,
  runs,
  siteId,
  runId,
  onSite,
  onRun,
  runError,
  run,
  cable,
  unit,
  end,
  onEnd,
  endError,
}: {
  sites: readonly Named[];
  runs: readonly Named[];
  siteId: string;
  runId: string;
  onSite: (siteId: string) => void;
  onRun: (runId: string) => void;
  runError?: string;
  /** The chosen run, or undefined while none is chosen. */
  run: WhereRun | undefined;
  /** The run's cable type; null or undefined when it is not known here. */
  cable: { name: string; vf: number; vfTolerance: number } | null | undefined;
  unit: LengthUnit;
  end: 'A' | 'B' | '';
  onEnd: (end: 'A' | 'B') => void;
  endError?: string;
}) {
  return (
    <Card title="1. Where">
      <SiteRunFields sites={sites} runs={runs} siteId={siteId} runId={run ? runId : ''} onSite={onSite} onRun={onRun} runError={runError} />
      {run && (
        <p className="mt-2 text-sm text-ink-soft" data-testid="where-run-summary">
          {runSummary(run, cable, unit)}
        </p>
      )}
      <EndPicker end={end} onChange={onEnd} labels={run ? { A: run.endALabel, B: run.endBLabel } : null} error={endError} />
    </Card>
  );
}
