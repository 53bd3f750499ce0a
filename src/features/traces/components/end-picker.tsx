/**
 * "Instrument connected at": the two ends of a cable run as large buttons a
 * gloved thumb can hit, each with the end's own label from the run.
 */
export interface EndPickerProps {
  end: 'A' | 'B' | '';
  onChange: (end: 'A' | 'B') => void;
  /** The run's end labels; absent until a run is chosen. */
  labels?: { A: string; B: string } | null;
  error?: string;
}

export function EndPicker({ end, onChange, labels, error }: EndPickerProps) {
  return (
    <fieldset className="mt-3">
      <legend className="text-sm font-semibold text-ink-soft">Instrument connected at</legend>
      <div className="mt-1 grid grid-cols-2 gap-2">
        {(['A', 'B'] as const).map((e) => (
          <button
            key={e}
            type="button"
            aria-pressed={end === e}
            onClick={() => onChange(e)}
            className={`min-h-14 rounded-md border-2 px-3 py-2 text-left ${end === e ? 'border-copper bg-copper-light' : 'border-rule bg-white'}`}
          >
            <span className="block text-lg font-bold">End {e}</span>
            <span className="block text-sm text-ink-soft">{labels ? labels[e] : '—'}</span>
          </button>
        ))}
      </div>
      {error && <p className="mt-1 text-xs font-semibold text-danger">{error}</p>}
    </fieldset>
  );
}
