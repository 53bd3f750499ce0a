import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes, TextareaHTMLAttributes } from 'react';
import { useId } from 'react';
import { plainMessage } from '../../lib/api-client';
import { lengthsInText, type LengthUnit } from '../../lib/format';

const CONTROL = 'block w-full min-h-11 rounded-md border border-rule bg-white px-3 py-2 text-base text-ink shadow-inner aria-[invalid=true]:border-danger';

interface Common {
  label: ReactNode;
  hint?: ReactNode;
  error?: string;
}

function Wrap({ id, label, hint, error, children }: Common & { id: string; children: ReactNode }) {
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-semibold text-ink-soft">
        {label}
      </label>
      {children}
      {hint && !error && <p className="text-xs text-mist">{hint}</p>}
      {error && (
        <p id={`${id}-error`} className="text-xs font-semibold text-danger">
          {error}
        </p>
      )}
    </div>
  );
}

export function TextField({ label, hint, error, ...props }: Common & InputHTMLAttributes<HTMLInputElement>) {
  const id = useId();
  return (
    <Wrap id={id} label={label} hint={hint} error={error}>
      <input id={id} aria-invalid={error ? true : undefined} aria-describedby={error ? `${id}-error` : undefined} className={CONTROL} {...props} />
    </Wrap>
  );
}

export function SelectField({ label, hint, error, children, ...props }: Common & SelectHTMLAttributes<HTMLSelectElement>) {
  const id = useId();
  return (
    <Wrap id={id} label={label} hint={hint} error={error}>
      <select id={id} aria-invalid={error ? true : undefined} className={CONTROL} {...props}>
        {children}
      </select>
    </Wrap>
  );
}

export function TextAreaField({ label, hint, error, ...props }: Common & TextareaHTMLAttributes<HTMLTextAreaElement>) {
  const id = useId();
  return (
    <Wrap id={id} label={label} hint={hint} error={error}>
      <textarea id={id} aria-invalid={error ? true : undefined} className={`${CONTROL} min-h-20`} {...props} />
    </Wrap>
  );
}

/**
 * Map an ApiError's field list onto { field: message } for forms, each
 * message in our words (shown under the field's own label) and its lengths
 * in the reader's unit.
 */
export function fieldErrors(error: unknown, unit: LengthUnit = 'm'): Record<string, string> {
  const fields = (error as { fields?: Array<{ field: string; message: string }> } | null)?.fields ?? [];
  return Object.fromEntries(fields.map((f) => [f.field, lengthsInText(plainMessage(f.message), unit)]));
}
