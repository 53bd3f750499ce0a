import { z } from 'zod';
import { textId } from '../../shared/schemas/input';

/** `/:id` in a route path: a positive whole number in plain digits ("0x10", "1e3" are refused), or a 400 naming the field. */
export const IdParam = z.object({ id: textId('a positive whole number') });
