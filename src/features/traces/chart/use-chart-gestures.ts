import { useEffect, useRef, type PointerEvent, type RefObject } from 'react';
import { panRange, zoomRange, type Range } from './view-window';

/** How close (px) a press must be to a cursor's line to take hold of it. */
const GRAB_PX = 16;
/** Movement (px) after which a press is a drag, not a tap. */
const TAP_SLOP_PX = 6;

export interface PlotGeometry {
  left: number;
  right: number;
  xMin: number;
  xMax: number;
}

type Gesture =
  | { kind: 'tap'; startPx: number; startRange: Range }
  | { kind: 'pan'; startPx: number; startRange: Range }
  | { kind: 'cursor'; index: 0 | 1; startPx: number; moved: boolean }
  | { kind: 'pinch'; startGap: number; startRange: Range; anchor: number };

export interface GestureOptions {
  geometry: PlotGeometry | null;
  range: Range;
  limits: Range;
  minSpan: number;
  /** Pixel positions of the cursors' lines (null for none). */
  cursorPx: [number | null, number | null];
  setRange: (r: Range) => void;
  onTap: (x: number) => void;
  onCursorDrag: (i: 0 | 1, x: number) => void;
}

/** The axis value under a pixel of the plot, or null before the chart has laid out. */
function xOnPlot(g: PlotGeometry | null, px: number): number | null {
  if (!g || g.right <= g.left) return null;
  return g.xMin + ((px - g.left) / (g.right - g.left)) * (g.xMax - g.xMin);
}

/**
 * Pointer handling on the plot, for mouse, pen and touch alike: a tap moves
 * the chosen cursor there; a press on a cursor's line drags it; a drag
 * elsewhere pans a zoomed view; two fingers pinch to zoom; Ctrl + wheel
 * zooms about the pointer. Vertical swipes are left to the page, so a phone
 * still scrolls past the chart.
 */
export function useChartGestures(element: RefObject<HTMLDivElement | null>, opts: GestureOptions) {
  const gesture = useRef<Gesture | null>(null);
  const pointers = useRef(new Map<number, number>());
  const latest = useRef(opts);
  useEffect(() => {
    latest.current = opts;
  });

  const xAt = (px: number) => xOnPlot(latest.current.geometry, px);
  const pxOf = (e: { clientX: number }) => e.clientX - (element.current?.getBoundingClientRect().left ?? 0);
  const inPlot = (px: number) => {
    const g = latest.current.geometry;
    return !!g && px >= g.left - 2 && px <= g.right + 2;
  };

  useEffect(() => {
    const el = element.current;
    if (!el) return;
    const wheel = (e: WheelEvent) => {
      if (!e.ctrlKey && !e.metaKey) return;
      const x = xOnPlot(latest.current.geometry, e.clientX - el.getBoundingClientRect().left);
      if (x === null) return;
      e.preventDefault();
      const o = latest.current;
      o.setRange(zoomRange(o.range, e.deltaY < 0 ? 1.25 : 0.8, x, o.limits, o.minSpan));
    };
    el.addEventListener('wheel', wheel, { passive: false });
    return () => el.removeEventListener('wheel', wheel);
  }, [element]);

  const onPointerDown = (e: PointerEvent<HTMLDivElement>) => {
    if (e.pointerType === 'mouse' && e.button !== 0) return;
    const px = pxOf(e);
    pointers.current.set(e.pointerId, px);
    e.currentTarget.setPointerCapture?.(e.pointerId);
    const o = latest.current;
    if (pointers.current.size === 2) {
      const [a, b] = [...pointers.current.values()];
      const anchor = xAt((a + b) / 2);
      gesture.current = anchor === null ? null : { kind: 'pinch', startGap: Math.max(1, Math.abs(a - b)), startRange: o.range, anchor };
      return;
    }
    const near = ([0, 1] as const)
      .filter((i) => o.cursorPx[i] !== null && Math.abs(o.cursorPx[i]! - px) <= GRAB_PX)
      .sort((i, j) => Math.abs(o.cursorPx[i]! - px) - Math.abs(o.cursorPx[j]! - px))[0];
    gesture.current = near !== undefined ? { kind: 'cursor', index: near, startPx: px, moved: false } : { kind: 'tap', startPx: px, startRange: o.range };
  };

  const onPointerMove = (e: PointerEvent<HTMLDivElement>) => {
    if (!pointers.current.has(e.pointerId)) return;
    const px = pxOf(e);
    pointers.current.set(e.pointerId, px);
    const g = gesture.current;
    const o = latest.current;
    if (!g) return;
    if (g.kind === 'pinch') {
      const [a, b] = [...pointers.current.values()];
      if (b === undefined) return;
      o.setRange(zoomRange(g.startRange, Math.max(1, Math.abs(a - b)) / g.startGap, g.anchor, o.limits, o.minSpan));
      return;
    }
    if (g.kind === 'cursor') {
      if (Math.abs(px - g.startPx) > TAP_SLOP_PX) g.moved = true;
      const x = xAt(px);
      if (g.moved && x !== null) o.onCursorDrag(g.index, x);
      return;
    }
    if (g.kind === 'tap' && Math.abs(px - g.startPx) > TAP_SLOP_PX) gesture.current = { kind: 'pan', startPx: g.startPx, startRange: g.startRange };
    const pan = gesture.current;
    if (pan?.kind === 'pan' && o.geometry) {
      const perPx = (pan.startRange.max - pan.startRange.min) / Math.max(1, o.geometry.right - o.geometry.left);
      o.setRange(panRange(pan.startRange, -(px - pan.startPx) * perPx, o.limits));
    }
  };

  const end = (e: PointerEvent<HTMLDivElement>, cancelled: boolean) => {
    if (!pointers.current.has(e.pointerId)) return;
    pointers.current.delete(e.pointerId);
    const g = gesture.current;
    if (pointers.current.size > 0) {
      // One finger of a pinch lifted: the other goes on as a pan from here.
      if (g?.kind === 'pinch') gesture.current = null;
      return;
    }
    gesture.current = null;
    if (cancelled || !g) return;
    const px = pxOf(e);
    if ((g.kind === 'tap' || (g.kind === 'cursor' && !g.moved)) && inPlot(px)) {
      const x = xAt(px);
      if (x !== null) latest.current.onTap(x);
    }
  };

  return {
    onPointerDown,
    onPointerMove,
    onPointerUp: (e: PointerEvent<HTMLDivElement>) => end(e, false),
    onPointerCancel: (e: PointerEvent<HTMLDivElement>) => end(e, true),
  };
}
