import { getLabSettings } from '@/db/queries/settings';
import { requirePageUser } from '@/lib/auth/session';
import { LAB_SETTINGS_DEFAULTS } from '@/lib/settings/lab-settings';
import { timeZoneNames } from '@/lib/time/lab-time';
import { SettingsForm } from './_components/settings-form';

export const metadata = { title: 'Lab settings' };

/** A zone set through the API that this runtime does not list still shows as chosen. */
const withStored = (zones: string[], stored: string) => (zones.includes(stored) ? zones : [stored, ...zones]);

export default async function SettingsPage() {
  await requirePageUser(['lab_manager']);
  const settings = await getLabSettings();
  return (
    <div className="max-w-4xl space-y-4">
      <h1>Lab settings</h1>
      <p className="text-sm text-ink-soft">
        Dose sizes, thresholds and counts are the lab’s own choices. The default and its source are shown beside each. Decisions on breeding
        soundness rest with the examining veterinarian and local regulations.
      </p>
      <SettingsForm initial={settings} defaults={LAB_SETTINGS_DEFAULTS} timeZones={withStored(timeZoneNames(), settings.timeZone)} />
    </div>
  );
}
