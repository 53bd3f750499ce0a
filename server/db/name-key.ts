/**
 * The form of a name two rows may not share: Unicode compatibility-normalised
 * (NFKC), case-folded in every script (the database's lower() folds ASCII
 * only, so "É" and "é" or "Ω" and "ω" would pass it; lower, upper, lower again
 * also folds "ß" with "ss") and with runs of spaces as one.
 */
export function nameKey(name: string): string {
  return name.normalize('NFKC').toLowerCase().toUpperCase().toLowerCase().replace(/\s+/g, ' ').trim();
}
