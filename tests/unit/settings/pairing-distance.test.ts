import { describe, expect, it } from 'vitest';
import { pairingDistanceOf } from '@/db/queries/agreement-core';
import { PAIRING_DISTANCE_PX_DEFAULT, PAIRING_DISTANCE_UM_DEFAULT, pairingDistancePx } from '@/lib/agreement/pairing';
import { LAB_SETTINGS_DEFAULTS, labSettingsSchema, mergeLabSettings } from '@/lib/settings/lab-settings';

describe('the pairing distance lab setting', () => {
  it('defaults to 4 µm (about half a stallion sperm head’s length, from memory), also for settings stored before it existed', () => {
    expect(LAB_SETTINGS_DEFAULTS.pairingDistanceUm).toBe(PAIRING_DISTANCE_UM_DEFAULT);
    expect(PAIRING_DISTANCE_UM_DEFAULT).toBe(4);
    expect(mergeLabSettings({ targetCells: 150 }).pairingDistanceUm).toBe(4);
    expect(labSettingsSchema.parse({ ...LAB_SETTINGS_DEFAULTS, pairingDistanceUm: undefined }).pairingDistanceUm).toBe(4);
  });

  it('is refused outside 0.5–20 µm with a message a person can act on', () => {
    const r = labSettingsSchema.safeParse({ ...LAB_SETTINGS_DEFAULTS, pairingDistanceUm: 0.1 });
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]).toMatchObject({ path: ['pairingDistanceUm'], message: 'Pairing distance must be at least 0.5.' });
    expect(labSettingsSchema.safeParse({ ...LAB_SETTINGS_DEFAULTS, pairingDistanceUm: 25 }).success).toBe(false);
    expect(labSettingsSchema.parse({ ...LAB_SETTINGS_DEFAULTS, pairingDistanceUm: '6' }).pairingDistanceUm).toBe(6);
  });

  it('turns into pixels with the image’s scale, or at the lab’s pixel size on an image without one', () => {
    // 4 µm at 0.25 µm/px is 16 px, the pixel default (arithmetic).
    const lab = pairingDistanceOf(LAB_SETTINGS_DEFAULTS);
    expect(lab).toEqual({ distanceUm: 4, fallbackPx: 16 });
    expect(pairingDistancePx(null, lab)).toBe(PAIRING_DISTANCE_PX_DEFAULT);
    expect(pairingDistancePx(0.3, lab)).toBeCloseTo(13.333, 3);
    // 6 µm on images without a scale at 0.5 µm/px: 12 px.
    expect(pairingDistancePx(null, pairingDistanceOf({ pairingDistanceUm: 6, unscaledMicronsPerPixel: 0.5 }))).toBe(12);
    // Settings without the pairing fields (older callers): the defaults.
    expect(pairingDistanceOf({})).toEqual({ distanceUm: 4, fallbackPx: 16 });
  });
});
