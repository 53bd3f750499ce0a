import type { ReactNode } from 'react';

const BUTTON = 'min-h-11 min-w-11 rounded-md border border-rule bg-card px-3 text-sm font-semibold disabled:text-mist';

export const GAIN_STEPS = [1, 2, 4, 8, 16, 32, 64] as const;

function Row({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div className="flex flex-wrap items-center gap-2" role="group" aria-label={label}>
      <span className="w-full text-sm font-semibold text-ink-soft sm:w-36">{label}</span>
      {children}
    </div>
  );
}

export interface DistanceGainState {
  on: boolean;
  dbPer100m: number;
}

/**
 * The chart's controls: horizontal zoom, vertical gain (and moving the
 * magnified band up or down), and the distance gain that lifts far echoes.
 */
export function ChartControls({
  onZoom,
  onShowAll,
  zoomToEvent,
  gain,
  onGain,
  onShift,
  distanceGain,
  onDistanceGain,
  libraryLoss,
}: {
  onZoom: (factor: number) => void;
  onShowAll: () => void;
  zoomToEvent: { label: string; go: () => void } | null;
  gain: number;
  onGain: (g: number) => void;
  onShift: (quarters: number) => void;
  distanceGain: DistanceGainState;
  onDistanceGain: (s: DistanceGainState) => void;
  /** The cable's attenuation from the library, at the echo's frequency, as text; null when the library has none. */
  libraryLoss: string | null;
}) {
  const at = GAIN_STEPS.indexOf(gain as (typeof GAIN_STEPS)[number]);
  const maxDb = Math.max(10, Math.ceil(distanceGain.dbPer100m * 2));
  return (
    <div className="mt-2 space-y-2 print:hidden" data-testid="chart-controls">
      <Row label="Zoom">
        <button type="button" className={BUTTON} onClick={() => onZoom(1.5)}>
          Closer
        </button>
        <button type="button" className={BUTTON} onClick={() => onZoom(1 / 1.5)}>
          Farther
        </button>
        <button type="button" className={BUTTON} onClick={onShowAll}>
          Whole trace
        </button>
        {zoomToEvent && (
          <button type="button" className={BUTTON} onClick={zoomToEvent.go}>
            {zoomToEvent.label}
          </button>
        )}
      </Row>
      <Row label="Vertical gain">
        <button type="button" className={BUTTON} aria-label="Less vertical gain" disabled={at <= 0} onClick={() => onGain(GAIN_STEPS[at - 1])}>
          −
        </button>
        <span className="min-w-12 text-center text-lg font-bold tabular" data-testid="vertical-gain">
          ×{gain}
        </span>
        <button type="button" className={BUTTON} aria-label="More vertical gain" disabled={at >= GAIN_STEPS.length - 1} onClick={() => onGain(GAIN_STEPS[at + 1])}>
          +
        </button>
        {gain > 1 && (
          <>
            <button type="button" className={BUTTON} aria-label="Show higher levels" onClick={() => onShift(1)}>
              ▲
            </button>
            <button type="button" className={BUTTON} aria-label="Show lower levels" onClick={() => onShift(-1)}>
              ▼
            </button>
            <span className="text-xs text-ink-soft">about the trace at the chosen cursor</span>
          </>
        )}
      </Row>
      <Row label="Distance gain">
        <label className="flex min-h-11 items-center gap-2 text-sm">
          <input type="checkbox" className="size-5 accent-copper" checked={distanceGain.on} onChange={(e) => onDistanceGain({ ...distanceGain, on: e.target.checked })} />
          Lift far echoes
        </label>
        {distanceGain.on && (
          <label className="flex min-h-11 min-w-0 flex-1 items-center gap-2 text-sm">
            <input
              type="range"
              className="h-11 min-w-0 flex-1 accent-copper"
              aria-label="Cable loss to make up, dB per 100 m"
              min={0}
              max={maxDb}
              step={0.1}
              value={distanceGain.dbPer100m}
              onChange={(e) => onDistanceGain({ ...distanceGain, dbPer100m: Number(e.target.value) })}
            />
            <span className="w-28 text-right font-semibold tabular" data-testid="distance-gain-db">
              {distanceGain.dbPer100m.toFixed(1)} dB/100 m
            </span>
          </label>
        )}
      </Row>
      {distanceGain.on && (
        <p className="text-xs text-ink-soft">
          {libraryLoss ? `Starts from the library’s ${libraryLoss}. ` : 'The library has no attenuation for this cable: set the loss to make up. '}
          Far echoes are drawn taller to make up for it; the readings and ρ are unchanged.
        </p>
      )}
    </div>
  );
}
