import { expect, test } from '@playwright/test';
import sharp from 'sharp';
import { signIn, USERS } from './support/auth';

test('a technician drops several field images, sees progress and the gallery, and one bad file is refused', async ({ page }) => {
  await signIn(page, USERS.tech);
  const stallions = await (await page.request.get('/api/stallions?pageSize=5')).json();
  const created = await page.request.post('/api/collections', {
    data: {
      stallionId: stallions.rows[0].id, collectedAt: new Date(Date.now() - 3600e3).toISOString(), volumeMl: 40, concentrationMethod: 'entered',
      concentrationMillionPerMl: 120, totalMotilityPct: 70, progressiveMotilityPct: 60, preparation: 'eosin_nigrosin', optics: 'bright_field', magnification: 1000,
    },
  });
  const { collection } = await created.json();
  await page.goto(`/collections/${collection.id}`);
  // Files given before the upload zone is hydrated would go to a plain input nobody listens to.
  await page.waitForLoadState('networkidle');

  const field = (hue: string) => sharp({ create: { width: 1600, height: 1200, channels: 3, background: hue } }).jpeg().toBuffer();
  await page.getByLabel('Field image files').setInputFiles([
    { name: 'field-01.jpg', mimeType: 'image/jpeg', buffer: await field('#5b4a6b') },
    { name: 'field-02.jpg', mimeType: 'image/jpeg', buffer: await field('#6b5a7b') },
    { name: 'notes.png', mimeType: 'image/png', buffer: Buffer.from('not an image at all, just text\n'.repeat(50)) },
  ]);

  const uploads = page.getByRole('list', { name: 'Uploads' });
  await expect(uploads.getByRole('progressbar', { name: 'Upload of field-01.jpg' })).toBeVisible();
  await expect(uploads.getByRole('listitem').filter({ hasText: 'field-01.jpg' })).toContainText('Stored');
  await expect(uploads.getByRole('listitem').filter({ hasText: 'field-02.jpg' })).toContainText('Stored');
  await expect(uploads.getByRole('listitem').filter({ hasText: 'notes.png' })).toContainText(/Refused: notes\.png: .*not a picture/i);

  const gallery = page.getByRole('list', { name: 'Field images' });
  await expect(gallery.getByRole('listitem')).toHaveCount(2);
  await expect(gallery.getByRole('img', { name: 'Thumbnail of field-01.jpg' })).toBeVisible();
  await expect(gallery.getByRole('listitem').first()).toContainText('1600 × 1200 px');

  // The same file again is recognised, not stored twice.
  await page.getByLabel('Field image files').setInputFiles([{ name: 'again.jpg', mimeType: 'image/jpeg', buffer: await field('#5b4a6b') }]);
  await expect(uploads.getByRole('listitem').filter({ hasText: 'again.jpg' })).toContainText('not stored twice');
  await expect(gallery.getByRole('listitem')).toHaveCount(2);
});
