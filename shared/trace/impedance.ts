/**
 * Reflection coefficient and impedance, ρ = (ZL − Z0)/(ZL + Z0) and its
 * inverse Z = Z0 (1 + ρ)/(1 − ρ) (D. M. Pozar, "Microwave Engineering",
 * 4th ed., eq. 2.35).
 */
export function reflectionFromImpedance(zLoadOhm: number, z0Ohm: number): number {
  if (zLoadOhm === Infinity) return 1;
  return (zLoadOhm - z0Ohm) / (zLoadOhm + z0Ohm);
}

/** Impedance seen at a reflection; Infinity for ρ = +1 (open). */
export function impedanceFromReflection(rho: number, z0Ohm: number): number {
  if (rho >= 1) return Infinity;
  return (z0Ohm * (1 + rho)) / (1 - rho);
}
