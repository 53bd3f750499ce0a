import type { core } from 'zod';

/** Zod's own English for an issue, as opposed to a message of ours set on the schema. */
const STOCK = /^(Invalid input|Invalid option|Invalid string|Invalid value|Too big|Too small|Unrecognized key)/;

const TYPE_WORDS: Record<string, string> = {
  number: 'a number',
  int: 'a whole number',
  string: 'text',
  boolean: 'true or false',
  array: 'a list',
  object: 'a set of values',
  date: 'a date',
};

function bound(issue: core.$ZodIssueTooBig | core.$ZodIssueTooSmall): string {
  const big = issue.code === 'too_big';
  const limit = String(big ? issue.maximum : issue.minimum);
  const inclusive = issue.inclusive !== false;
  const how = big ? (inclusive ? 'at most' : 'less than') : inclusive ? 'at least' : 'more than';
  if (issue.origin === 'string') return !big && limit === '1' && inclusive ? 'must not be empty' : `must be ${how} ${limit} character${limit === '1' ? '' : 's'}`;
  if (issue.origin === 'array' || issue.origin === 'set') return `must have ${how} ${limit} item${limit === '1' ? '' : 's'}`;
  return `must be ${how} ${limit}`;
}

/**
 * An issue in the product's words ("must be at most 100 characters", "must be one of: ok, failed"), where zod
 * gave its stock English ("Too big: expected string to have <=100 characters"); a message set on the schema is
 * kept as it is.
 */
export function issueWords(issue: core.$ZodIssue): string {
  if (!STOCK.test(issue.message)) return issue.message;
  switch (issue.code) {
    case 'invalid_type': {
      const received = (issue as { input?: unknown }).input;
      if (received === undefined && /received undefined/.test(issue.message)) return 'is required';
      return `must be ${TYPE_WORDS[issue.expected] ?? issue.expected}`;
    }
    case 'too_big':
      return bound(issue);
    case 'too_small':
      return bound(issue);
    case 'invalid_value':
      return issue.values.length === 1 ? `must be ${String(issue.values[0])}` : `must be one of: ${issue.values.map(String).join(', ')}`;
    case 'unrecognized_keys':
      return 'is not expected here';
    case 'invalid_format':
      return 'is not in the expected form';
    default:
      return 'is not valid';
  }
}
