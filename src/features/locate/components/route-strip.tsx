import { useLayoutEffect, useRef, useState } from 'react';
import { routeLengthM, type MarkerLike, type RoutePosition } from '../../../../shared/field/route-position';
import { formatLength, formatLengthRange, type LengthUnit } from '../../../lib/format';

/** Colours from the palette (src/index.css): the route in ink, markers in teal, the location and window in copper. */
const INK = '#1d2731';
const MIST = '#5a6874';
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

const LABEL_PX = 7.5; // width of a 13 px semibold character, roughly (generous for Source Sans 3)
const SMALL_PX = 6.8; // a 12 px character
const BOLD_PX = 7.8; // a 13 px bold character
const GAP = 6;

/** The line the strip is drawn on, and the two label rows above it (text baselines). */
export const LINE_Y = 74;
export const ROW_Y = [36, 18] as const;
/** Where a leader line ends under each row. */
const LEADER_TOP = [40, 22] as const;
/** The band a row-0 label's text takes up, top to bottom. */
const ROW0_BAND = [24, 40] as const;

export interface PlacedLabel {
  x: number;
  label: string;
  /** 0 next to the line, 1 above it; -1: no room, not drawn. */
  row: number;
  anchorX: number;
  /** The text's box, left and right, padding included. */
  left: number;
  right: number;
}

/** Where a row-1 leader, from the marker up to its label, crosses the band of row-0 text: an x range. */
function leaderSpan(x: number, anchorX: number): [number, number] {
  const at = (y: number) => x + ((anchorX - x) * (LINE_Y - 8 - y)) / (LINE_Y - 8 - LEADER_TOP[1]);
  const a = at(ROW0_BAND[0]);
  const b = at(ROW0_BAND[1]);
  return [Math.min(a, b) - 2, Math.max(a, b) + 2];
}

const overlaps = (a: [number, number], b: [number, number]) => a[0] < b[1] && b[0] < a[1];

/** How far along a row-1 leader (from the marker up to its label) the top of the row-0 text band lies. */
const BAND_FRACTION = (LINE_Y - 8 - ROW0_BAND[1]) / (LINE_Y - 8 - LEADER_TOP[1]);

/**
 * Two label rows above the line. A label takes the row next to the line when
 * it clears the labels there and every leader line passing through; else the
 * row above, moved sideways as little as needed so that it clears that row
 * and its leader passes no label below; a label that fits neither is left to
 * its tick, never drawn over another.
 */
export function labelRows(places: Array<{ x: number; label: string }>, width: number): PlacedLabel[] {
  const boxes: Array<Array<[number, number]>> = [[], []];
  const leaders: Array<[number, number]> = [];
  return places.map((p) => {
    const w = p.label.length * LABEL_PX + 8;
    const startAt = (anchor: number) => Math.min(Math.max(anchor - w / 2, 0), width - w);
    const start = startAt(p.x);
    const box: [number, number] = [start, start + w];
    if (!boxes[0].some((b) => overlaps(b, box)) && !leaders.some((l) => overlaps(l, box))) {
      boxes[0].push(box);
      return { ...p, row: 0, anchorX: start + w / 2, left: box[0], right: box[1] };
    }
    // Row 1: the natural place, then places that bend the leader just clear of each label below.
    const anchors = [start + w / 2];
    for (const [b0, b1] of boxes[0]) {
      anchors.push(p.x + (b1 + 3 - p.x) / BAND_FRACTION, p.x - (p.x - b0 + 3) / BAND_FRACTION);
    }
    anchors.sort((a, b) => Math.abs(a - p.x) - Math.abs(b - p.x));
    for (const anchor of anchors) {
      const s = startAt(anchor);
      const upper: [number, number] = [s, s + w];
      const leader = leaderSpan(p.x, s + w / 2);
      if (boxes[1].some((b) => overlaps(b, upper)) || boxes[0].some((b) => overlaps(b, leader))) continue;
      boxes[1].push(upper);
      leaders.push(leader);
      return { ...p, row: 1, anchorX: s + w / 2, left: upper[0], right: upper[1] };
    }
    return { ...p, row: -1, anchorX: p.x, left: p.x, right: p.x };
  });
}

export interface BottomLabels {
  /** The start and end of the strip, or null when the best-location label needs the room. */
  from: { text: string; left: number; right: number } | null;
  to: { text: string; left: number; right: number } | null;
  best: { x: number; left: number; right: number };
}

/**
 * The row under the line: the strip's start and end lengths at its corners and
 * "best location" under the mark, moved in from the edges; an end length the
 * best-location label would run into is left out (the whole route's ends are
 * named above the line anyway).
 */
export function bottomLabels(fromText: string, toText: string, at: number, width: number, pad: number): BottomLabels {
  const bw = 'best location'.length * BOLD_PX;
  const x = Math.min(Math.max(at, pad + bw / 2), width - pad - bw / 2);
  const best = { x, left: x - bw / 2, right: x + bw / 2 };
  const fromBox = { text: fromText, left: pad, right: pad + fromText.length * SMALL_PX };
  const toBox = { text: toText, left: width - pad - toText.length * SMALL_PX, right: width - pad };
  return {
    best,
    from: fromBox.right + GAP <= best.left ? fromBox : null,
    to: best.right + GAP <= toBox.left && fromBox.right + GAP <= toBox.left ? toBox : null,
  };
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
  const lineY = LINE_Y;
  const shown = places.filter((p) => p.chainageM >= fromM - 1e-9 && p.chainageM <= toM + 1e-9);
  const labels = labelRows(
    shown.map((p) => ({ x: x(p.chainageM), label: p.label })),
    width,
  );
  const ws = x(Math.max(fromM, pos.windowStartChainageM));
  const we = x(Math.min(toM, pos.windowEndChainageM));
  const at = x(pos.chainageM);
  const height = 128;
  const bottom = bottomLabels(formatLength(fromM, unit), formatLength(toM, unit), at, width, pad);
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
              <line x1={l.x} x2={l.anchorX} y1={lineY - 8} y2={LEADER_TOP[l.row]} stroke={MIST} strokeWidth={1} />
              <text x={l.anchorX} y={ROW_Y[l.row]} textAnchor="middle" fontSize={13} fontWeight={600} fill={INK}>
                {l.label}
              </text>
            </g>
          ),
        )}
        <g>
          <line x1={at} x2={at} y1={lineY - 22} y2={lineY + 22} stroke={COPPER} strokeWidth={3} />
          <path d={`M ${at - 7} ${lineY - 34} L ${at + 7} ${lineY - 34} L ${at} ${lineY - 22} Z`} fill={COPPER} />
        </g>
        {bottom.from && (
          <text x={pad} y={height - 6} fontSize={12} fill={MIST}>
            {bottom.from.text}
          </text>
        )}
        {bottom.to && (
          <text x={width - pad} y={height - 6} fontSize={12} fill={MIST} textAnchor="end">
            {bottom.to.text}
          </text>
        )}
        <text x={bottom.best.x} y={height - 6} fontSize={13} fontWeight={700} fill={COPPER} textAnchor="middle">
          best location
        </text>
      </svg>
      {(!bottom.from || !bottom.to) && (
        // An end length the best-location label would have covered is said here instead, so no length is lost on a narrow screen.
        <p className="text-xs text-mist tabular" data-testid={`${testId}-span`}>
          From {formatLength(fromM, unit)} to {formatLength(toM, unit)} along the ground
        </p>
      )}
    </figure>
  );
}

/**
 * The second strip's stretch and its title: from the last place (end or marker)
 * before the dig window to the first one after it, titled by those two places;
 * or, where they are closer than three windows, three windows centred on it,
 * so a narrow window is still a band and not a line.
 */
export function closeUpSpan(
  places: ReadonlyArray<Pick<Place, 'label' | 'chainageM' | 'kind'>>,
  pos: Pick<RoutePosition, 'windowStartChainageM' | 'windowEndChainageM'>,
  routeM: number,
): { fromM: number; toM: number; title: string } {
  const before = places.filter((p) => p.chainageM <= pos.windowStartChainageM).pop() ?? places[0];
  const after = places.find((p) => p.chainageM >= pos.windowEndChainageM) ?? places[places.length - 1];
  const windowM = Math.max(pos.windowEndChainageM - pos.windowStartChainageM, 1);
  if (after.chainageM - before.chainageM < 3 * windowM) {
    const mid = (pos.windowStartChainageM + pos.windowEndChainageM) / 2;
    return { fromM: Math.max(0, mid - 1.5 * windowM), toM: Math.min(routeM, mid + 1.5 * windowM), title: 'Close-up of the dig window' };
  }
  const name = (p: Pick<Place, 'label' | 'kind'>) => (p.kind === 'end' ? `end ${p.label}` : p.label);
  return { fromM: before.chainageM, toM: after.chainageM, title: `Between ${name(before)} and ${name(after)}, around the dig window` };
}

/**
 * The route drawn as a strip, along the ground from end A: the ends, the
 * markers, the slack coiled at them, the dig window and the best location.
 * The first strip is the whole route; the second is the stretch around the
 * dig window (closeUpSpan). Drawn from the page's
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
  const { fromM: lo, toM: hi, title: closeUpTitle } = closeUpSpan(places, pos, routeM);
  const closeUp = lo > 0 || hi < routeM;
  return (
    <div ref={ref} className="space-y-3" aria-label="Route strip">
      {width > 0 && (
        <>
          <Strip places={places} fromM={0} toM={routeM} pos={pos} width={width} unit={unit} title="Whole route, along the ground from end A" testId="route-strip" />
          {closeUp && <Strip places={places} fromM={lo} toM={hi} pos={pos} width={width} unit={unit} title={closeUpTitle} testId="route-strip-close" />}
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
