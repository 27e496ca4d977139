import { z } from 'zod';
import { idField, listQuery, optionalInt, optionalText, requiredText } from './fields';

export const stallionSchema = z.object({
  name: requiredText('Name', 120),
  registration: optionalText('Registration or microchip number', 60).optional(),
  breed: optionalText('Breed', 80).optional(),
  foalingYear: optionalInt('Foaling year', 1960, new Date().getUTCFullYear()).optional(),
  clientId: idField('the owner'),
  notes: optionalText('Notes', 2000).optional(),
});
export type StallionInput = z.input<typeof stallionSchema>;
export type StallionValues = z.output<typeof stallionSchema>;

export const STALLION_SORTS = ['name', 'breed', 'foalingYear', 'owner', 'lastCollection', 'collections'] as const;
export const stallionListQuery = listQuery(STALLION_SORTS, 'name').extend({
  clientId: z.coerce.number().int().positive().optional(),
});
