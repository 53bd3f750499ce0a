import type { ReflectionEvent } from '../../../shared/schemas/trace-analysis';
import { formatLength, lengthsInText, type LengthUnit } from '../../lib/format';

/**
 * The engine's kinds, in words. The engine types them from the event's own ρ: open ≥ +0.8, short ≤ −0.8,
 * with wider bands for a last, loss-spread end (shared/trace/classify.ts), which the meaning then says.
 */
export const TYPE_WORDS: Record<ReflectionEvent['type'], string> = {
  open: 'Open',
  short: 'Short',
  'impedance-rise': 'Impedance rise',
  'impedance-drop': 'Impedance drop',
};

/** A ρ value with its sign always written and a true minus: "−0.54", "+0.723", "0.00". */
export function signedRho(rho: number, digits = 2): string {
  const s = Math.abs(rho).toFixed(digits);
  return `${rho < 0 && Number(s) !== 0 ? '−' : rho > 0 && Number(s) !== 0 ? '+' : ''}${s}`;
}

/**
 * A sentence the engine wrote, with every negative figure given the true minus the rest of the page
 * uses ("peak −0.04", "ρ ≈ −0.12"), and a figure that is zero at its precision given none ("−0.00" is "0.00").
 * Only a hyphen that starts a figure changes: one inside a name ("HH-1") or between figures ("3-5") stays.
 */
export function trueMinusInText(text: string): string {
  return text.replace(/(^|[\s([=≈:;,/])-(\d+(?:\.\d+)?)/g, (_, before: string, figure: string) =>
    Number(figure) === 0 ? `${before}${figure}` : `${before}−${figure}`,
  );
}

/**
 * An engine warning in the reader's unit. The blind-zone one is written from
 * the analysis' own value, not from the figure rounded into the message, so
 * it matches the "Blind zone" line beside it. Negative figures get the true minus.
 */
export function warningWords(w: { code: string; message: string }, blindZoneM: number, unit: LengthUnit) {
  const text = w.code === 'BLIND_ZONE' ? w.message.replace(/\d+(\.\d+)? m\b/, formatLength(blindZoneM, 'm')) : w.message;
  return trueMinusInText(lengthsInText(text, unit));
}

/** ρ in plain words, its sign always written and a true minus: "reflection −0.54". */
export function rhoText(rho: number): string {
  return `reflection ${signedRho(rho)}`;
}

/** "Impedance drop · reflection −0.54": the engine's kind and the ρ it was named from, in words a crew reads without the symbol. */
export function eventTitle(e: Pick<ReflectionEvent, 'type' | 'reflectionCoefficient'>): string {
  return `${TYPE_WORDS[e.type]} · ${rhoText(e.reflectionCoefficient)}`;
}

/**
 * What the size of ρ says, in plain words. Only ρ at or beyond ±0.8 is
 * called an open or a short; a strong drop or rise short of that is a
 * partial fault, and is said so, not called a short or an open.
 */
export function eventMeaning(e: Pick<ReflectionEvent, 'type' | 'reflectionCoefficient'>): string {
  const rho = e.reflectionCoefficient;
  const size = Math.abs(rho);
  switch (e.type) {
    case 'open':
      if (rho < 0.8)
        return 'Read as an open though the reflection is below +0.80: nothing real follows it and its edge is spread by the cable’s loss, which takes more of a far end than the correction can be sure to give back. Likely the cable ends or a conductor is broken here; confirm from the other end.';
      return 'A full open: the cable ends or a conductor is broken here.';
    case 'short':
      if (rho > -0.8)
        return 'Read as a short though the reflection is above −0.80: nothing real follows it and its edge is spread by the cable’s loss, which takes more of a far end than the correction can be sure to give back. Likely the conductors touch here; confirm from the other end.';
      return 'A full short: the conductors touch, or nearly, here.';
    case 'impedance-drop':
      if (size >= 0.3) return 'A strong drop, short of a full short (that reads beyond −0.80): a low-resistance fault, heavy water or a crushed section.';
      if (size >= 0.05) return 'A drop: water, a crushed section, a splice or a change of cable.';
      return 'A slight drop: a splice, a change of cable or the start of damp.';
    case 'impedance-rise':
      if (size >= 0.3) return 'A strong rise, short of a full open (that reads beyond +0.80): a high-resistance joint or a partly broken conductor.';
      if (size >= 0.05) return 'A rise: a high-resistance joint, a splice or a change of cable.';
      return 'A slight rise: a splice or a change of cable.';
  }
}
