/**
 * The arithmetic-geometric mean and the complete elliptic integral of the
 * first kind it gives: K(k) = π / (2·AGM(1, k′)), k′ = √(1 − k²)
 * (Abramowitz & Stegun, "Handbook of Mathematical Functions", 17.6).
 */

/** AGM(a, b) for a, b ≥ 0: iterate a ← (a+b)/2, b ← √(ab) until they agree to rounding. */
export function agm(a: number, b: number): number {
  if (!(a >= 0 && b >= 0)) return Number.NaN;
  for (let i = 0; i < 64; i++) {
    if (Math.abs(a - b) <= 1e-15 * a) break;
    const next = (a + b) / 2;
    b = Math.sqrt(a * b);
    a = next;
  }
  return a;
}

/** K(k) from the modulus k and its complement k′ (given separately so that neither loses digits near 0 or 1). */
export function ellipticK(k: number, kPrime = Math.sqrt(1 - k * k)): number {
  if (!(k >= 0 && k < 1)) return Number.NaN;
  return Math.PI / (2 * agm(1, kPrime));
}
