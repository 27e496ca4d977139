import { getLabSettings } from '@/db/queries/settings';
import { requirePageUser } from '@/lib/auth/session';
import { LAB_SETTINGS_DEFAULTS } from '@/lib/settings/lab-settings';
import { SettingsForm } from './_components/settings-form';

export const metadata = { title: 'Lab settings' };

export default async function SettingsPage() {
  await requirePageUser(['lab_manager']);
  return (
    <div className="max-w-4xl space-y-4">
      <h1>Lab settings</h1>
      <p className="text-sm text-ink-soft">
        Dose sizes, thresholds and counts are the lab’s own choices. The default and its source are shown beside each. Decisions on breeding
        soundness rest with the examining veterinarian and local regulations.
      </p>
      <SettingsForm initial={await getLabSettings()} defaults={LAB_SETTINGS_DEFAULTS} />
    </div>
  );
}
