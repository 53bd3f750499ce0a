/**
 * The second simulator's sets: each one's seed and size. Kept apart from the generator so that drawing a
 * new set does not change the hash of the generator's source (see sets.ts): the cached sets stay valid, since each set's
 * cache file is named by its seed and size as well as that hash.
 */
export const SETS = {
  tuning: { seed: 0x51a7e, count: 80 },
  // A second set for developing the engine, drawn the same way from its own seed: more cases to tune on.
  tuning2: { seed: 0x510e52, count: 80 },
  // A third set to tune on, drawn when the fifth held-out set was: more cases to tune on.
  tuning3: { seed: 0x9b05688c, count: 80 },
  // Held out: for measuring the engine only. Never tune on it, print it or read its results.
  heldout: { seed: 0x2b7e15, count: 120 },
  // A second held-out set, drawn after the first had been measured once: the same rules apply.
  heldout2: { seed: 0x6a09e6, count: 120 },
  // A third, drawn after the second had been measured once: the same rules apply.
  heldout3: { seed: 0x3c6ef3, count: 120 },
  // A fourth, drawn after the third had been measured: the same rules apply.
  heldout4: { seed: 0xa54ff5, count: 120 },
  // A fifth, drawn after the fourth had been measured once, before this round's engine changes: the same rules apply.
  heldout5: { seed: 0x1f83d9ab, count: 120 },
  // A fourth set to tune on, drawn when the sixth held-out set was: more cases to tune on.
  tuning4: { seed: 0x1a3a49ef, count: 80 },
  // A sixth, drawn after the fifth had been measured once, before this round's engine changes: the same rules apply.
  heldout6: { seed: 0x8622ec4d, count: 120 },
  // A seventh, drawn after the sixth had been run once on the engine as this round began: the same rules apply.
  heldout7: { seed: 0xb1176e92, count: 120 },
  // An eighth, drawn after the seventh had been run once on the final engine of its round, before this round's engine changes: the same rules apply.
  heldout8: { seed: 0x3f09f272, count: 120 },
  // A ninth, drawn after the eighth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout9: { seed: 0x00646396, count: 120 },
  // A check set for judging each engine change during a round, so a change that helps only the cases it was
  // tuned on shows up before the held-out run: its summary lines may be read, its cases never printed or inspected.
  check: { seed: 0x7c4a9e31, count: 120 },
  // A tenth, drawn after the ninth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout10: { seed: 0x5be0cd19, count: 120 },
  // An eleventh, drawn after the tenth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout11: { seed: 0x714f7121, count: 120 },
  // A twelfth, drawn after the eleventh had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout12: { seed: 0x428a2f98, count: 120 },
  // A thirteenth, drawn after the twelfth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout13: { seed: 0x71374491, count: 120 },
  // A fourteenth, drawn after the thirteenth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout14: { seed: 0xb5c0fbcf, count: 120 },
  // A fifteenth, drawn after the fourteenth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout15: { seed: 0xe9b5dba5, count: 120 },
  // A sixteenth, drawn after the fifteenth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout16: { seed: 0x3956c25b, count: 120 },
  // A seventeenth, drawn after the sixteenth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout17: { seed: 0x59f111f1, count: 120 },
  // An eighteenth, drawn after the seventeenth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout18: { seed: 0x923f82a4, count: 120 },
} as const satisfies Record<string, { seed: number; count: number }>;

export type SetName = keyof typeof SETS;

/** Every set's name, in the order the sets were drawn. */
export const SET_NAMES = Object.keys(SETS) as SetName[];
