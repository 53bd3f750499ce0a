/**
 * Propagation arithmetic for TDR: a reflection seen after round-trip time t
 * comes from distance d = VF · c · t / 2 (the wave goes out and back).
 */

/** Speed of light in vacuum, exact by the SI definition of the metre (BIPM, SI Brochure 9th ed.). */
export const SPEED_OF_LIGHT_M_PER_S = 299_792_458;

/** International foot, exact by definition (1959 international yard and pound agreement). */
export const M_PER_FT = 0.3048;

/** Vacuum permeability, H/m (CODATA 2018 recommended value; no longer exact since the 2019 SI). */
export const MU_0 = 1.25663706212e-6;
/** Vacuum permittivity, F/m, from ε0 = 1/(μ0·c²) so that the two constants agree with c exactly. CODATA 2018: 8.8541878128e-12. */
export const EPSILON_0 = 1 / (MU_0 * SPEED_OF_LIGHT_M_PER_S ** 2);
/** Impedance of free space η0 = μ0·c ≈ 376.73 Ω. */
export const ETA_0 = MU_0 * SPEED_OF_LIGHT_M_PER_S;

/** One-way distance in metres for a round-trip time in seconds at velocity factor `vf`. */
export function distanceFromRoundTrip(roundTripS: number, vf: number): number {
  return (vf * SPEED_OF_LIGHT_M_PER_S * roundTripS) / 2;
}

/** Round-trip time in seconds for a one-way distance in metres at velocity factor `vf`. */
export function roundTripFromDistance(distanceM: number, vf: number): number {
  return (2 * distanceM) / (vf * SPEED_OF_LIGHT_M_PER_S);
}
