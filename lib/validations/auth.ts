import { z } from 'zod';
import { ROLES } from '@/lib/auth/roles';

export const signInSchema = z.object({
  email: z.email('Enter a valid e-mail address.').max(254),
  password: z.string().min(1, 'Enter your password.').max(200),
});

export const passwordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(200, 'Use at most 200 characters.');

export const inviteSchema = z.object({
  email: z.email('Enter a valid e-mail address.').max(254),
  name: z.string().trim().min(1, 'Enter the person’s name.').max(120),
  role: z.enum(ROLES, 'Choose a role.'),
  clientId: z.coerce.number().int().positive().optional(),
});

export const userUpdateSchema = z
  .object({
    role: z.enum(ROLES, 'Choose a role.').optional(),
    active: z.boolean().optional(),
  })
  .refine((v) => v.role !== undefined || v.active !== undefined, 'Nothing to change.');

export const acceptInvitationSchema = z
  .object({ token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, 'This link is not valid.'), password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ['confirm'], message: 'The two passwords differ.' });
