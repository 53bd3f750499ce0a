/**
 * Propagation arithmetic for TDR: a reflection seen after round-trip time t
 * comes from distance d = VF · c · t / 2 (the wave goes out and back).
 */

/** Speed of light in vacuum, exact by the SI definition of the metre (BIPM, SI Brochure 9th ed.). */
export const SPEED_OF_LIGHT_M_PER_S = 299_792_458;

/** International foot, exact by definition (1959 international yard and pound agreement). */
export const M_PER_FT = 0.3048;

/** One-way distance in metres for a round-trip time in seconds at velocity factor `vf`. */
export function distanceFromRoundTrip(roundTripS: number, vf: number): number {
  return (vf * SPEED_OF_LIGHT_M_PER_S * roundTripS) / 2;
}

/** Round-trip time in seconds for a one-way distance in metres at velocity factor `vf`. */
export function roundTripFromDistance(distanceM: number, vf: number): number {
  return (2 * distanceM) / (vf * SPEED_OF_LIGHT_M_PER_S);
}
