/**
 * The Idempotency-Key of a form that makes something on the server (a
 * decision, a reading, a close-out): the same while the same values are sent
 * again — a try whose answer was lost to poor signal, sent once more — so the
 * server answers the repeat with what the first try made; a new one once the
 * values change or the server has taken them.
 */
export interface RepeatKey {
  /** The key for sending `body` now. */
  keyFor: (body: unknown) => string;
  /** The server took it: the next send is a new thing. */
  taken: () => void;
}

export function repeatKey(prefix: string): RepeatKey {
  let held: { body: string; key: string } | null = null;
  return {
    keyFor(body) {
      const text = JSON.stringify(body) ?? '';
      if (!held || held.body !== text) held = { body: text, key: `${prefix}-${crypto.randomUUID()}` };
      return held.key;
    },
    taken() {
      held = null;
    },
  };
}
