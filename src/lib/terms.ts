/**
 * The trade's terms that Rholog shows as they are, each with a short
 * explanation in plain words for someone meeting it for the first time.
 * Figures quoted are common practice (typical values from memory of
 * manufacturers' data), not limits: the cable library holds each cable's own.
 */
export const TERMS = {
  rho: {
    name: 'ρ, the reflection coefficient',
    text: 'How much of the test pulse came back from this point, from −1 to +1. Near +1 is an open (the cable ends or a conductor is broken); near −1 is a short (conductors touching). Values nearer 0 are smaller changes such as a splice, a crushed section or water: + means the impedance rises there, − that it falls.',
  },
  z0: {
    name: 'Z0, the characteristic impedance',
    text: 'The impedance a pulse meets travelling along a sound length of this cable, set by its conductors and insulation: typically 50 or 75 Ω for coax, about 100 Ω for telephone and data pairs, a few tens of ohms for power cable. A reflection shows where the impedance changes from Z0.',
  },
  vf: {
    name: 'Velocity factor (VF)',
    text: 'How fast the pulse travels in this cable as a share of the speed of light: 0.66 means 66 %. Distance = VF × speed of light × round-trip time ÷ 2, so a VF that is 2 % off puts the fault 2 % off. The ± is how far the true VF may be from this value.',
  },
  roundTrip: {
    name: 'Round-trip time',
    text: 'The time from the pulse leaving the instrument to its reflection coming back. The pulse goes there and back, so the distance is half of it multiplied by the pulse speed.',
  },
  blindZone: {
    name: 'Blind zone',
    text: 'The first stretch of cable, next to the instrument, where its own outgoing pulse hides any reflection. A fault inside it cannot be seen from this end: test from the other end, or with a shorter pulse width (the zone shrinks with the pulse).',
  },
  traceKind: {
    name: 'Trace kind',
    text: 'How the instrument tested: "step" sends a voltage step, so the trace stays up or down after each change; "pulse" sends a short pulse, so each reflection is a blip. Rholog reads both.',
  },
  window95: {
    name: 'The 95 % window',
    text: 'The stretch of cable the fault lies in, 19 times out of 20, allowing for the velocity factor’s tolerance, the trace’s timing and the recorded lengths. The single figure is the most likely point; expose the whole window before deciding the fault is not there. Readings from both ends narrow it.',
  },
  cableWindow: {
    name: 'Cable-length window',
    text: 'The 95 % window measured along the cable itself, slack coiled at markers included, as the instrument sees it. The dig window on the ground below has the slack taken off.',
  },
  standardUncertainty: {
    name: 'Standard uncertainty',
    text: 'The typical size of the error in the distance (one standard deviation). About twice it either side of the figure makes the 95 % window.',
  },
  chiSquare: {
    name: 'χ², the agreement test',
    text: 'Checks whether the readings point at the same place, given how uncertain each one is. Below the 95 % limit they agree and are combined. Above it at least one is probably wrong (wrong end, wrong velocity factor, or a different fault): check them before digging.',
  },
} as const;

export type TermKey = keyof typeof TERMS;
