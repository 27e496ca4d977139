import { z } from 'zod';
import { classSetSchema } from '@/lib/class-sets/schema';

export const classSetUpdateSchema = z.intersection(classSetSchema, z.object({ isDefault: z.boolean().optional() }));
