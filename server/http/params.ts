import { z } from 'zod';

/** `/:id` in a route path: a positive whole number, or a 400 naming the field. */
export const IdParam = z.object({ id: z.coerce.number().int().positive({ error: 'must be a positive whole number' }) });
