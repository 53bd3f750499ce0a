import { z } from 'zod';
import { multiLine, required } from './input';
import { FINDING_KINDS, type FindingStatus } from './findings';

export const FINDING_DECISION_ACTIONS = ['decided', 'reversed'] as const;
export type FindingDecisionAction = (typeof FINDING_DECISION_ACTIONS)[number];

/** A supervisor turns a confirmed event into a dismissed one or back, saying why. */
export const FindingReverseSchema = z.strictObject({
  /**
   * The status the finding is to have. A reversal names it, so a request sent
   * twice, or after someone else reversed the finding, is refused (409
   * `decision_changed`) instead of turning it back.
   */
  to: z.enum(['confirmed', 'dismissed'], { error: required("is required: the status the finding is to have, 'confirmed' or 'dismissed'") }),
  reason: multiLine(
    z
      .string({ error: required('is required: say why the decision is reversed') })
      .trim()
      .min(10, 'must be at least 10 characters: say why the decision is reversed')
      .max(2000, 'must be at most 2000 characters'),
  ),
  /** What the event is after the reversal; when left out, a dismissal becomes "not a fault" and a confirmation keeps a fault kind. */
  kind: z.enum(FINDING_KINDS, { error: `must be one of ${FINDING_KINDS.join(', ')}` }).optional(),
});
export type FindingReverseInput = z.input<typeof FindingReverseSchema>;

export interface FindingDecisionView {
  id: number;
  action: FindingDecisionAction;
  fromStatus: FindingStatus | null;
  toStatus: FindingStatus;
  kind: string;
  reason: string | null;
  decidedBy: { id: number; name: string };
  at: string;
}
