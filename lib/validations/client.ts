import { z } from 'zod';
import { listQuery, optionalText, requiredText } from './fields';

export const clientSchema = z.object({
  name: requiredText('Name', 120),
  kind: z.enum(['owner', 'referring_vet'], 'Choose owner or referring vet.'),
  email: z.preprocess((v) => (v === '' ? null : v), z.email('Enter a valid e-mail address.').max(254).nullable().optional()),
  phone: optionalText('Phone', 40).optional(),
  address: optionalText('Address', 300).optional(),
  notes: optionalText('Notes', 2000).optional(),
});
export type ClientInput = z.input<typeof clientSchema>;
export type ClientValues = z.output<typeof clientSchema>;

export const CLIENT_SORTS = ['name', 'kind', 'email', 'stallions'] as const;
export const clientListQuery = listQuery(CLIENT_SORTS, 'name');
