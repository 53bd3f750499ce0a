import { useLayoutEffect, useRef, useState } from 'react';
import { routeLengthM, type MarkerLike, type RoutePosition } from '../../../../shared/field/route-position';
import { formatLength, formatLengthRange, type LengthUnit } from '../../../lib/format';

/** Colours from the palette (src/index.css): the route in ink, markers in teal, the location and window in copper. */
const INK = '#1d2731';
const MIST = '#6b7a86';
const TEAL = '#1f6f78';
const COPPER = '#b8561f';
const COPPER_LIGHT = '#f6e2d2';

export interface StripRun {
  installedLengthM: number;
  endALabel: string;
  endBLabel: string;
  markers: MarkerLike[];
}

/** The element's width in CSS pixels, so text stays readable on a phone instead of shrinking with a viewBox. */
function useWidth() {
  const ref = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(0);
  useLayoutEffect(() => {
    const el = ref.current;
    if (!el) return;
    setWidth(el.clientWidth);
    if (typeof ResizeObserver === 'undefined') return;
    const ro = new ResizeObserver(() => setWidth(el.clientWidth));
    ro.observe(el);
    return () => ro.disconnect();
  }, []);
  return { ref, width };
}

interface Place {
  label: string;
  chainageM: number;
  slackM: number;
  kind: 'end' | 'marker';
}

const LABEL_PX = 7.5; // width of a 13 px character, roughly

/** Two label rows above the line; a label that fits neither is left to its tick. */
function labelRows(places: Array<{ x: number; label: string }>, width: number) {
  const lastEnd = [-Infinity, -Infinity];
  return places.map((p) => {
    const w = p.label.length * LABEL_PX + 8;
    const start = Math.min(Math.max(p.x - w / 2, 0), width - w);
    for (const row of [0, 1]) {
      if (start > lastEnd[row]) {
        lastEnd[row] = start + w;
        return { ...p, row, anchorX: start + w / 2 };
      }
    }
    return { ...p, row: -1, anchorX: p.x };
  });
}

/** A coil of slack drawn as three loops above the marker. */
function Coil({ x, y }: { x: number; y: number }) {
  return (
    <g stroke={INK} strokeWidth={1.5} fill="none" aria-hidden="true">
      {[-5, 0, 5].map((dx) => (
        <ellipse key={dx} cx={x + dx} cy={y} rx={5} ry={7} />
      ))}
    </g>
  );
}

function Strip({
  places,
  fromM,
  toM,
  pos,
  width,
  unit,
  title,
  testId,
}: {
  places: Place[];
  fromM: number;
  toM: number;
  pos: RoutePosition;
  width: number;
  unit: LengthUnit;
  title: string;
  testId: string;
}) {
  const pad = 14;
  const span = Math.max(toM - fromM, 1e-6);
  const x = (m: number) => pad + ((m - fromM) / span) * (width - 2 * pad);
  const lineY = 74;
  const shown = places.filter((p) => p.chainageM >= fromM - 1e-9 && p.chainageM <= toM + 1e-9);
  const labels = labelRows(
    shown.map((p) => ({ x: x(p.chainageM), label: p.label })),
    width,
  );
  const ws = x(Math.max(fromM, pos.windowStartChainageM));
  const we = x(Math.min(toM, pos.windowEndChainageM));
  const at = x(pos.chainageM);
  const height = 128;
  return (
    <figure className="space-y-1" data-testid={testId}>
      <figcaption className="text-xs font-semibold uppercase tracking-wide text-mist">{title}</figcaption>
      <svg width={width} height={height} role="img" aria-label={`${title}: route from ${formatLength(fromM, unit)} to ${formatLength(toM, unit)} along the ground, dig window ${formatLengthRange(pos.windowStartChainageM, pos.windowEndChainageM, unit)}`}>
        <rect x={ws} y={lineY - 16} width={Math.max(we - ws, 3)} height={32} fill={COPPER_LIGHT} stroke={COPPER} strokeWidth={1.5} rx={3} />
        <line x1={pad} x2={width - pad} y1={lineY} y2={lineY} stroke={INK} strokeWidth={4} strokeLinecap="round" />
        {shown.map((p) => {
          const px = x(p.chainageM);
          return (
            <g key={`${p.kind}-${p.label}`}>
              {p.kind === 'end' ? (
                <rect x={px - 6} y={lineY - 6} width={12} height={12} fill={INK} />
              ) : (
                <circle cx={px} cy={lineY} r={6} fill="#ffffff" stroke={TEAL} strokeWidth={3} />
              )}
              {p.slackM > 0 && <Coil x={px} y={lineY + 24} />}
            </g>
          );
        })}
        {labels.map((l) =>
          l.row < 0 ? null : (
            <g key={`label-${l.label}`}>
              <line x1={l.x} x2={l.anchorX} y1={lineY - 8} y2={l.row === 0 ? 40 : 22} stroke={MIST} strokeWidth={1} />
              <text x={l.anchorX} y={l.row === 0 ? 36 : 18} textAnchor="middle" fontSize={13} fontWeight={600} fill={INK}>
                {l.label}
              </text>
            </g>
          ),
        )}
        <g>
          <line x1={at} x2={at} y1={lineY - 22} y2={lineY + 22} stroke={COPPER} strokeWidth={3} />
          <path d={`M ${at - 7} ${lineY - 34} L ${at + 7} ${lineY - 34} L ${at} ${lineY - 22} Z`} fill={COPPER} />
        </g>
        <text x={pad} y={height - 6} fontSize={12} fill={MIST}>
          {formatLength(fromM, unit)}
        </text>
        <text x={width - pad} y={height - 6} fontSize={12} fill={MIST} textAnchor="end">
          {formatLength(toM, unit)}
        </text>
        <text x={Math.min(Math.max(at, pad + 70), width - pad - 70)} y={height - 6} fontSize={13} fontWeight={700} fill={COPPER} textAnchor="middle">
          best location
        </text>
      </svg>
    </figure>
  );
}

/**
 * The route drawn as a strip, along the ground from end A: the ends, the
 * markers, the slack coiled at them, the dig window and the best location.
 * The first strip is the whole route; the second is the stretch from the last
 * marker before the window to the first one after it. Drawn from the page's
 * own data, so it works without a signal.
 */
export function RouteStrip({ run, pos, unit }: { run: StripRun; pos: RoutePosition; unit: LengthUnit }) {
  const { ref, width } = useWidth();
  const routeM = routeLengthM(run);
  const places: Place[] = [
    { label: 'A', chainageM: 0, slackM: 0, kind: 'end' as const },
    ...[...run.markers].sort((a, b) => a.chainageM - b.chainageM).map((m) => ({ label: m.label, chainageM: m.chainageM, slackM: m.slackM, kind: 'marker' as const })),
    { label: 'B', chainageM: routeM, slackM: 0, kind: 'end' as const },
  ];
  const before = places.filter((p) => p.chainageM <= pos.windowStartChainageM).pop() ?? places[0];
  const after = places.find((p) => p.chainageM >= pos.windowEndChainageM) ?? places[places.length - 1];
  // The close-up spans at least three windows, so a narrow window is still a band and not a line.
  const windowM = Math.max(pos.windowEndChainageM - pos.windowStartChainageM, 1);
  let lo = before.chainageM;
  let hi = after.chainageM;
  if (hi - lo < 3 * windowM) {
    const mid = (pos.windowStartChainageM + pos.windowEndChainageM) / 2;
    lo = Math.max(0, mid - 1.5 * windowM);
    hi = Math.min(routeM, mid + 1.5 * windowM);
  }
  const closeUp = lo > 0 || hi < routeM;
  return (
    <div ref={ref} className="space-y-3" aria-label="Route strip">
      {width > 0 && (
        <>
          <Strip places={places} fromM={0} toM={routeM} pos={pos} width={width} unit={unit} title="Whole route, along the ground from end A" testId="route-strip" />
          {closeUp && <Strip places={places} fromM={lo} toM={hi} pos={pos} width={width} unit={unit} title="Close-up of the dig window" testId="route-strip-close" />}
        </>
      )}
      <p className="text-xs text-ink-soft">
        A: {run.endALabel} · B: {run.endBLabel}
      </p>
      <p className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft">
        <span>
          <span className="mr-1 inline-block size-3 rounded-full border-[3px] border-teal align-middle" /> route marker
        </span>
        <span>
          <span className="mr-1 inline-block h-3 w-5 rounded-sm border border-copper bg-copper-light align-middle" /> dig window (95 %)
        </span>
        <span>
          <span className="mr-1 inline-block h-3 w-1 bg-copper align-middle" /> best location
        </span>
        <span>loops under a marker: slack coiled there</span>
      </p>
    </div>
  );
}
