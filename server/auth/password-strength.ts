import { ZxcvbnFactory } from '@zxcvbn-ts/core';
import * as common from '@zxcvbn-ts/language-common';
import * as en from '@zxcvbn-ts/language-en';
import { AppError } from '../errors';

/**
 * zxcvbn's score runs 0–4; 3 means "safely unguessable: moderate protection
 * from offline slow-hash scenario" in its authors' scale, which is what a
 * scrypt-hashed password needs (common practice: refuse 0–2).
 */
export const MIN_SCORE = 3;

let estimator: ZxcvbnFactory | undefined;
function zxcvbn() {
  // The dictionaries take a moment to load: once, on first use.
  estimator ??= new ZxcvbnFactory({
    dictionary: { ...common.dictionary, ...en.dictionary },
    graphs: common.adjacencyGraphs,
    translations: en.translations,
  });
  return estimator;
}

/** What of the person's own identity a password must not contain: the e-mail, its local part, each part of the name. */
function ownWords(person: { email: string; name: string }): Array<{ word: string; what: string }> {
  const email = person.email.trim().toLowerCase();
  const local = email.split('@')[0] ?? '';
  const words = [
    { word: email, what: 'your e-mail address' },
    { word: local, what: 'your e-mail address' },
    ...person.name
      .toLowerCase()
      .split(/[\s.,'’-]+/)
      .map((part) => ({ word: part, what: 'your name' })),
  ];
  return words.filter((w) => w.word.length >= 3);
}

/** Why a new password is refused for this person, or null when it is acceptable. */
export function passwordProblem(password: string, person: { email: string; name: string }): string | null {
  const lower = password.toLowerCase();
  const own = ownWords(person).find((w) => lower.includes(w.word));
  if (own) return `must not contain ${own.what}`;
  const result = zxcvbn().check(password, [...ownWords(person).map((w) => w.word), 'rholog']);
  if (result.score < MIN_SCORE) {
    const why = result.feedback.warning ?? result.feedback.suggestions[0] ?? 'it follows a common pattern';
    return `is too easy to guess (strength ${result.score} of 4, needs ${MIN_SCORE}): ${why.replace(/\.$/, '')}. A few unrelated words make a strong one.`;
  }
  return null;
}

/** Throws 400 weak_password naming the field when the password is refused. */
export function assertStrongPassword(password: string, person: { email: string; name: string }, field = 'newPassword') {
  const problem = passwordProblem(password, person);
  if (problem) {
    throw AppError.badRequest('weak_password', `The new password ${problem}`, { fields: [{ field, message: problem }] });
  }
}
