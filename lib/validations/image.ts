import { z } from 'zod';

export const uploadQuery = z.object({
  name: z.string().trim().min(1, 'Give the file name.').max(300),
  micronsPerPixel: z.preprocess((v) => (v === '' ? undefined : v), z.coerce.number().positive('The scale must be above 0 µm per pixel.').max(100, 'The scale cannot exceed 100 µm per pixel.').optional()),
  magnification: z.preprocess((v) => (v === '' ? undefined : v), z.coerce.number().int().min(10).max(2000).optional()),
  optics: z.enum(['bright_field', 'dic', 'phase_contrast']).optional(),
});

export const imageUpdateSchema = z
  .object({
    move: z.enum(['up', 'down']).optional(),
    micronsPerPixel: z.number().positive('The scale must be above 0 µm per pixel.').max(100).nullable().optional(),
  })
  .refine((v) => v.move !== undefined || v.micronsPerPixel !== undefined, 'Nothing to change.');

export const collectionScaleSchema = z.object({ micronsPerPixel: z.number().positive('The scale must be above 0 µm per pixel.').max(100) });

export const imageVariantParams = z.object({
  id: z.coerce.number().int().positive(),
  variant: z.enum(['display', 'thumb', 'original'], 'Ask for display, thumb or original.'),
});
