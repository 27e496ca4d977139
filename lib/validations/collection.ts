import { z } from 'zod';
import { semenErrors } from '@/lib/semen/arithmetic';
import { tryConcentrationFromChamber } from '@/lib/semen/chamber';
import { idField, listQuery, optionalInt, optionalNumber, optionalText } from './fields';

export const PREPARATIONS = {
  eosin_nigrosin: 'Eosin–nigrosin stained smear',
  other_stain: 'Other stained smear',
  fixed_wet_mount: 'Fixed wet mount',
} as const;
export const OPTICS = { bright_field: 'Bright field', dic: 'DIC', phase_contrast: 'Phase contrast' } as const;

const FUTURE_SLACK_MS = 5 * 60 * 1000;

export const collectionSchema = z
  .object({
    stallionId: idField('the stallion'),
    collectedAt: z.coerce
      .date({ error: 'Enter the date and time of collection.' })
      .refine((d) => d.getTime() <= Date.now() + FUTURE_SLACK_MS, 'The collection date cannot be in the future.')
      .refine((d) => d.getUTCFullYear() >= 1990, 'The collection date is too far in the past.'),
    volumeMl: optionalNumber('Gel-free volume', 0, 1000, ' mL'),
    concentrationMethod: z.enum(['entered', 'chamber']).default('entered'),
    concentrationMillionPerMl: optionalNumber('Concentration', 0, 5000, ' × 10^6/mL'),
    chamberDilution: optionalInt('Dilution factor', 1, 1000).optional(),
    chamberSquares: optionalInt('Squares counted', 1, 25).optional(),
    chamberCount1: optionalInt('Count in chamber 1', 0, 100000).optional(),
    chamberCount2: optionalInt('Count in chamber 2', 0, 100000).optional(),
    totalMotilityPct: optionalNumber('Total motility', 0, 100, ' %'),
    progressiveMotilityPct: optionalNumber('Progressive motility', 0, 100, ' %'),
    preparation: z.enum(Object.keys(PREPARATIONS) as [keyof typeof PREPARATIONS], 'Choose the preparation.'),
    optics: z.enum(Object.keys(OPTICS) as [keyof typeof OPTICS], 'Choose the optics.'),
    magnification: optionalInt('Magnification', 40, 2000).transform((v) => v ?? 1000),
    collectedBy: optionalText('Collected by', 120).optional(),
    remarks: optionalText('Remarks', 2000).optional(),
  })
  .superRefine((v, ctx) => {
    if (v.concentrationMethod === 'chamber') {
      const missing = (['chamberDilution', 'chamberSquares', 'chamberCount1', 'chamberCount2'] as const).filter((k) => v[k] == null);
      for (const k of missing) ctx.addIssue({ code: 'custom', path: [k], message: 'Needed to work out the concentration from the chamber.' });
      if (missing.length === 0) {
        const r = tryConcentrationFromChamber({ dilution: v.chamberDilution!, squaresCounted: v.chamberSquares!, counts: [v.chamberCount1!, v.chamberCount2!] });
        if (!r.ok) ctx.addIssue({ code: 'custom', path: ['chamberCount1'], message: r.error.message });
        else if (!r.agree) {
          ctx.addIssue({
            code: 'custom',
            path: ['chamberCount2'],
            message: `The two chamber counts differ by ${r.difference}, more than the ${r.allowedDifference.toFixed(1)} expected by chance: recount both chambers.`,
          });
        }
      }
    }
    const concentration = v.concentrationMethod === 'entered' ? v.concentrationMillionPerMl : 1; // chamber: any value, checked above
    for (const e of semenErrors({ ...v, concentrationMillionPerMl: concentration })) {
      ctx.addIssue({ code: 'custom', path: [e.field], message: `${e.message}.` });
    }
  });

export type CollectionInput = z.input<typeof collectionSchema>;
export type CollectionValues = z.output<typeof collectionSchema>;

export const COLLECTION_SORTS = ['collectedAt', 'stallion', 'volumeMl', 'concentration', 'progressiveMotilityPct', 'totalSperm'] as const;
export const collectionListQuery = listQuery(COLLECTION_SORTS, 'collectedAt', 'desc').extend({
  stallionId: z.coerce.number().int().positive().optional(),
  from: z.iso.date('Use a date like 2026-05-01.').optional(),
  to: z.iso.date('Use a date like 2026-05-31.').optional(),
});

const cm = (label: string) => optionalNumber(label, 0.5, 30, ' cm');
export const testisSchema = z
  .object({
    measuredOn: z.iso.date('Enter the date of measurement.').refine((d) => new Date(`${d}T00:00:00Z`).getTime() <= Date.now(), 'The date cannot be in the future.'),
    method: z.enum(['caliper', 'ultrasound']),
    leftLengthCm: cm('Left length'),
    leftWidthCm: cm('Left width'),
    leftHeightCm: cm('Left height'),
    rightLengthCm: cm('Right length'),
    rightWidthCm: cm('Right width'),
    rightHeightCm: cm('Right height'),
    totalWidthCm: cm('Total scrotal width'),
    notes: optionalText('Notes', 2000).optional(),
  })
  .superRefine((v, ctx) => {
    const sides = ['left', 'right'] as const;
    const dims = ['LengthCm', 'WidthCm', 'HeightCm'] as const;
    let anyTestis = false;
    for (const s of sides) {
      const vals = dims.map((d) => v[`${s}${d}`]);
      const given = vals.filter((x) => x != null).length;
      if (given > 0) anyTestis = true;
      if (given > 0 && given < 3) {
        dims.forEach((d, i) => {
          if (vals[i] == null) ctx.addIssue({ code: 'custom', path: [`${s}${d}`], message: `Give length, width and height of the ${s} testis, or none.` });
        });
      }
    }
    if (!anyTestis && v.totalWidthCm == null) ctx.addIssue({ code: 'custom', path: ['totalWidthCm'], message: 'Give the testis dimensions or the total scrotal width.' });
  });
export type TestisInput = z.input<typeof testisSchema>;
export type TestisValues = z.output<typeof testisSchema>;
