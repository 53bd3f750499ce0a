import { EventEmitter } from 'node:events';

/**
 * What happens to findings, for whoever needs to react once it is stored.
 * 'confirmed' is emitted with the finding's id after its transaction has
 * committed, so a listener always reads the stored finding. Listeners must
 * not throw; an error in one is logged and does not undo the finding. Work
 * that must not be lost with a stopped server (the supervisors' e-mail) is
 * not a listener's: it is queued in the confirming transaction itself.
 */
interface FindingEventMap {
  confirmed: [findingId: number];
}

export const findingEvents = new EventEmitter<FindingEventMap>();
findingEvents.setMaxListeners(20);

export function emitFindingConfirmed(findingId: number, log: (message: string, extra?: unknown) => void) {
  for (const listener of findingEvents.listeners('confirmed')) {
    try {
      const result: unknown = listener(findingId);
      if (result instanceof Promise) result.catch((err: unknown) => log(`finding ${findingId}: a confirmed-listener failed`, err));
    } catch (err) {
      log(`finding ${findingId}: a confirmed-listener failed`, err);
    }
  }
}
