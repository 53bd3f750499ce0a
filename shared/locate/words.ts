/**
 * The best location in words, in the reader's unit: the same sentences on the
 * finding page, the ticket, the crew sheet and in e-mail, so every place the
 * crew reads carries the same numbers.
 */
import { describeRoute } from '../field/route-position';
import type { BestLocationView, LocationMethodView } from '../schemas/measurements';
import { formatLength, formatLengthRange, lengthsInText, type LengthUnit } from '../units/format-length';
import { geoUri } from './geo-files';

/** "612.3 m of cable from end A (Substation bay 3)", or null when the readings give no location. */
export function bestDistanceText(best: BestLocationView, endALabel: string, unit: LengthUnit): string | null {
  if (best.distanceFromAM === null) return null;
  return `${formatLength(best.distanceFromAM, unit)} of cable from end A (${endALabel})`;
}

/** "604.1–620.5 m of cable from end A" (the 95 % window). */
export function bestWindowText(best: BestLocationView, unit: LengthUnit): string | null {
  if (best.windowStartM === null || best.windowEndM === null) return null;
  return `${formatLengthRange(best.windowStartM, best.windowEndM, unit)} of cable from end A`;
}

/** "± 4.20 m (standard uncertainty)". */
export function bestUncertaintyText(best: BestLocationView, unit: LengthUnit): string | null {
  if (best.standardUncertaintyM === null) return null;
  return `± ${formatLength(best.standardUncertaintyM, unit)} (standard uncertainty)`;
}

/**
 * A weight in whole per cent. Readings that share most of their error (the
 * installed length, say) can take a small negative weight in the combined
 * mean; it is written with a true minus sign, never as "-0 %".
 */
export function weightText(weight: number): string {
  const pct = Math.round(weight * 100);
  return pct < 0 ? `−${-pct} %` : `${pct === 0 ? 0 : pct} %`;
}

/** A method with its share: "TDR from both ends (findings 3 and 4), 71 %". */
export function methodShareText(m: LocationMethodView): string {
  return m.weight === null ? m.label : `${m.label}, ${weightText(m.weight)}`;
}

/** The readings that went into the location, with their weights. */
export function methodsUsedText(best: BestLocationView): string {
  const used = best.methods.filter((m) => m.used);
  return used.length ? used.map(methodShareText).join('; ') : 'none';
}

/** "-30.001350, -15.000000 (within 11 m)" and the geo: link, when the run's markers carry coordinates. */
export function groundText(best: BestLocationView, unit: LengthUnit): { text: string; uri: string } | null {
  const g = best.ground;
  if (!g) return null;
  const uri = geoUri(g.point, g.radiusM);
  const [lat, lon] = uri.slice(4).split(/[,;]/);
  return {
    text: `${lat}, ${lon}, within ${formatLength(g.radiusM, unit)} (${g.fromLabel === g.toLabel ? `at ${g.fromLabel}` : `between ${g.fromLabel} and ${g.toLabel}`}, estimated from the markers' coordinates)`,
    uri,
  };
}

/**
 * The verdict in plain words for the crew: the agreement test's figures (χ², degrees
 * of freedom, its limit, a reading's distance in σ) are left out here and stand in
 * full under the readings behind the location ("Agreement test: …").
 */
export function plainVerdict(text: string): string {
  return text.replace(/ \(χ² = [^)]*\)/g, '').replace(/ \(\d+(?:\.\d+)? σ\)/g, '');
}

/** The best location rests on this finding's reading and no other: its headline already says all the reading does. */
export function onlyReadingOf(best: Pick<BestLocationView, 'methods' | 'distanceFromAM'> | null | undefined, findingId: number): boolean {
  if (!best || best.distanceFromAM === null || best.methods.length !== 1) return false;
  const [m] = best.methods;
  return m!.used && m!.findingId === findingId && m!.measurementId === null;
}

/** Said of a finding's reading when the best location is that reading alone (`onlyReadingOf`), rather than its figures again. */
export const ONLY_READING_SENTENCE = 'The best location above is this reading alone: the same distance, window and place to dig.';

/** A reading from end B that is the best location alone: its distance from the end it was measured at (the best location counts from A). */
export function onlyReadingFromBText(r: { distanceM: number; uncertaintyM: number; endLabel: string }, unit: LengthUnit): string {
  return `Measured from end B (${r.endLabel}): ${formatLength(r.distanceM, unit)} along the cable, ± ${formatLength(r.uncertaintyM, unit)} (95 %)`;
}

/**
 * Why a reading was set aside, in words a technician reads at the kerb: which
 * reading, how far from the others it puts the fault, and that the best
 * location is made without it. The figure an expert checks it by (how many
 * standard uncertainties off) is in `setAsideFigureText`, shown apart.
 */
export function setAsideText(outlier: Pick<NonNullable<BestLocationView['outlier']>, 'label' | 'offsetM'>, unit: LengthUnit): string {
  const side = outlier.offsetM > 0 ? 'further from' : 'nearer to';
  return (
    `${outlier.label} puts the fault ${formatLength(Math.abs(outlier.offsetM), unit)} ${side} end A than the other readings do. ` +
    'That is more than their uncertainties can explain, so it was left out and the best location comes from the others. ' +
    'Check that reading (end, cable, velocity factor) before relying on it.'
  );
}

/** The set-aside reading's gap in standard uncertainties (σ), for those who check the arithmetic. */
export function setAsideFigureText(outlier: Pick<NonNullable<BestLocationView['outlier']>, 'sigmas'>): string {
  // 1.96: the two-sided 95 % point of the normal distribution (common practice), COVERAGE_FACTOR_95 in ./estimate.
  return `${outlier.sigmas.toFixed(1)} σ: the gap is ${outlier.sigmas.toFixed(1)} times its standard uncertainty (σ); a reading more than 1.96 σ from the others is out of line at the 95 % level.`;
}

/** Label/value rows for an e-mail or a printed sheet: the best location first, then how it was reached. */
export function bestLocationRows(best: BestLocationView, run: { endALabel: string }, unit: LengthUnit): Array<[string, string]> {
  const distance = bestDistanceText(best, run.endALabel, unit);
  const rows: Array<[string, string]> = [];
  if (distance) {
    rows.push(['Best location', `${distance}, ${bestUncertaintyText(best, unit)}`]);
    rows.push(['Dig window (95 %)', bestWindowText(best, unit)!]);
    if (best.routePosition) rows.push(['Where to dig', describeRoute(best.routePosition, unit)]);
    const ground = groundText(best, unit);
    if (ground) rows.push(['Estimated position', `${ground.text} ${ground.uri}`]);
    rows.push(['Based on', methodsUsedText(best)]);
  } else {
    rows.push(['Best location', 'none: the readings disagree and none can be set aside']);
  }
  // The verdict and the reading set aside in the words the screens use: the agreement test's figures stay on the page.
  rows.push([best.consistent ? 'Readings' : 'Readings disagree', plainVerdict(lengthsInText(best.verdict, unit))]);
  if (best.outlier) rows.push(['Set aside', setAsideText(best.outlier, unit)]);
  if (best.checks.length) rows.push(['What to check', best.checks.map((c) => lengthsInText(c, unit)).join('; ')]);
  return rows;
}
