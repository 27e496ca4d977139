import { z } from 'zod';

export const idParams = z.object({ id: z.coerce.number({ error: 'The id must be a number.' }).int().positive('The id must be a positive whole number.') });
