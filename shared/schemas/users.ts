import { z } from 'zod';
import { jsonId, oneLine, required, textInt } from './input';
import { ROLES } from '../auth/permissions';
import type { TicketStatus } from '../tickets/status';

export const emailSchema = z
  .string({ error: required('is required') })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: 'must be an e-mail address' }).max(254));

export const LoginSchema = z.object({
  email: emailSchema,
  password: z.string({ error: required('is required') }).min(1, 'is required').max(200, 'must be at most 200 characters (no Rholog password is longer)'),
});

export const passwordSchema = z
  .string({ error: required('is required') })
  .min(10, 'must be at least 10 characters')
  .max(200, 'must be at most 200 characters');

export const ChangePasswordSchema = z.strictObject({
  currentPassword: z.string({ error: required('is required') }).min(1, 'is required').max(200, 'must be at most 200 characters'),
  newPassword: passwordSchema,
});

export const CreateUserSchema = z.strictObject({
  email: emailSchema,
  name: oneLine(z.string({ error: required('is required') }).trim().min(1, 'is required').max(120)),
  role: z.enum(ROLES, { error: `must be one of ${ROLES.join(', ')}` }),
  phone: oneLine(z.string().trim().max(40)).optional(),
});

// Strict: a field name it does not know is refused by name, not dropped while the answer says the change was made.
export const UpdateUserSchema = z
  .strictObject({
    name: oneLine(z.string().trim().min(1, 'is required').max(120)),
    role: z.enum(ROLES, { error: `must be one of ${ROLES.join(', ')}` }),
    active: z.boolean({ error: 'must be true or false' }),
    phone: oneLine(z.string().trim().max(40)).nullable(),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'give at least one field to change');

/** Hand a person's open repairs to another technician (POST /api/users/:id/hand-over-repairs). */
export const HandOverSchema = z.strictObject({
  toUserId: jsonId('must be a person'),
});

/** A person's open repair tickets; `movable` ones can be handed over (a fixed one waits for sign-off). */
export interface OpenRepairsView {
  userId: number;
  tickets: Array<{ id: number; title: string; status: TicketStatus; movable: boolean }>;
}

export const PreferencesSchema = z.strictObject({
  unitPreference: z.enum(['m', 'ft'], { error: 'must be m or ft' }),
});

export const ListQuerySchema = z.strictObject({
  q: z.string().trim().max(100).optional(),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 100, what: 'a page size' }).default(25),
});

export interface PublicUser {
  id: number;
  email: string;
  name: string;
  role: (typeof ROLES)[number];
  active: boolean;
  mustChangePassword: boolean;
  unitPreference: 'm' | 'ft';
}

export interface Page<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}
