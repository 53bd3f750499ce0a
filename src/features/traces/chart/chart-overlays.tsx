import { useRef, type KeyboardEvent, type PointerEvent } from 'react';
import { layoutLabels, rowsUsed, type LabelItem } from './label-layout';

export const LABEL_ROW_PX = 22;
const LABEL_FONT = '600 12px "Source Sans 3", system-ui, sans-serif';
const LABEL_PADDING_PX = 12;

let measurer: CanvasRenderingContext2D | null | undefined;

/** The width a label's text takes in the chart's label font (the box adds its padding). */
export function labelWidth(text: string): number {
  if (measurer === undefined) measurer = typeof document === 'undefined' ? null : document.createElement('canvas').getContext('2d');
  if (!measurer) return text.length * 7 + LABEL_PADDING_PX;
  measurer.font = LABEL_FONT;
  return Math.ceil(measurer.measureText(text).width) + LABEL_PADDING_PX;
}

export interface StripLabel {
  id: string;
  text: string;
  /** Pixel position of the line it names. */
  x: number;
  priority?: number;
  title?: string;
}

/**
 * A strip of labels above the plot, each centred on its line where there is
 * room: labels that would touch go to the next row, and one that fits in no
 * row is left out (its line stays on the chart, its name in the title).
 */
export function LabelStrip({
  labels,
  rows,
  plotLeft,
  plotRight,
  tone,
  testId,
  label,
}: {
  labels: StripLabel[];
  rows: number;
  plotLeft: number;
  plotRight: number;
  tone: 'copper' | 'teal';
  testId: string;
  label: string;
}) {
  const items: LabelItem[] = labels.map((l) => ({ id: l.id, x: l.x, width: labelWidth(l.text), priority: l.priority }));
  const placed = layoutLabels(items, { rows, gap: 4, minX: plotLeft, maxX: plotRight });
  const used = Math.max(1, rowsUsed(placed));
  const hidden = labels.filter((_, i) => !placed[i].shown);
  const colours = tone === 'copper' ? 'bg-copper text-white' : 'bg-teal text-white';
  return (
    <div className="relative" style={{ height: used * LABEL_ROW_PX }} aria-label={label} role="group" title={hidden.length ? `Not labelled here for want of room: ${hidden.map((h) => h.text).join(', ')}` : undefined}>
      {labels.map((l, i) =>
        placed[i].shown ? (
          <span
            key={l.id}
            data-testid={testId}
            data-x={l.x.toFixed(1)}
            title={l.title}
            className={`absolute flex h-5 items-center justify-center overflow-hidden whitespace-nowrap rounded text-xs font-semibold ${colours}`}
            style={{ left: placed[i].left, width: placed[i].width, top: placed[i].row * LABEL_ROW_PX }}
          >
            {l.text}
          </span>
        ) : null,
      )}
    </div>
  );
}

/**
 * Handles under the plot, one per cursor, to drag with a finger or the mouse
 * (or move with the arrow keys); 44 px square so a gloved finger finds them.
 */
export function CursorHandles({
  positions,
  plotLeft,
  plotRight,
  active,
  readouts,
  onDrag,
  onStep,
}: {
  positions: [number | null, number | null];
  plotLeft: number;
  plotRight: number;
  active: 0 | 1;
  readouts: [string, string];
  onDrag: (i: 0 | 1, px: number) => void;
  onStep: (i: 0 | 1, px: number) => void;
}) {
  const strip = useRef<HTMLDivElement>(null);
  const dragging = useRef<number | null>(null);
  const pxOf = (e: PointerEvent) => e.clientX - (strip.current?.getBoundingClientRect().left ?? 0);
  const down = (i: 0 | 1) => (e: PointerEvent<HTMLDivElement>) => {
    e.preventDefault();
    e.currentTarget.setPointerCapture(e.pointerId);
    dragging.current = e.pointerId;
    onDrag(i, pxOf(e));
  };
  const move = (i: 0 | 1) => (e: PointerEvent<HTMLDivElement>) => {
    if (dragging.current === e.pointerId) onDrag(i, pxOf(e));
  };
  const up = (e: PointerEvent<HTMLDivElement>) => {
    if (dragging.current === e.pointerId) dragging.current = null;
  };
  const key = (i: 0 | 1) => (e: KeyboardEvent<HTMLDivElement>) => {
    const step = e.key === 'ArrowLeft' ? -1 : e.key === 'ArrowRight' ? 1 : 0;
    if (!step || positions[i] === null) return;
    e.preventDefault();
    onStep(i, positions[i]! + step * (e.shiftKey ? 10 : 1));
  };
  return (
    <div ref={strip} className="relative h-11 print:hidden" aria-label="Cursor handles" role="group">
      <div className="absolute top-1/2 h-px bg-rule" style={{ left: plotLeft, width: Math.max(0, plotRight - plotLeft) }} />
      {([0, 1] as const).map((i) =>
        positions[i] === null ? null : (
          <div
            key={i}
            role="slider"
            tabIndex={0}
            aria-label={`Drag cursor ${i + 1}`}
            aria-valuetext={readouts[i]}
            aria-valuenow={Math.round(positions[i]!)}
            aria-valuemin={Math.round(plotLeft)}
            aria-valuemax={Math.round(plotRight)}
            data-testid={`cursor-handle-${i + 1}`}
            onPointerDown={down(i)}
            onPointerMove={move(i)}
            onPointerUp={up}
            onPointerCancel={up}
            onKeyDown={key(i)}
            className={`absolute top-0 flex size-11 cursor-ew-resize touch-none select-none items-center justify-center rounded-md border-2 text-sm font-bold focus:outline-none focus-visible:ring-2 focus-visible:ring-copper ${
              active === i ? 'border-ink bg-ink text-white' : 'border-ink bg-card text-ink'
            }`}
            style={{ left: positions[i]! - 22 }}
          >
            C{i + 1}
          </div>
        ),
      )}
    </div>
  );
}
