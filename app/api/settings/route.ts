import { getLabSettings, updateLabSettings } from '@/db/queries/settings';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { labSettingsSchema } from '@/lib/settings/lab-settings';

export const GET = route({ roles: STAFF_ROLES }, async () => ({ settings: await getLabSettings() }));

export const PUT = route({ roles: ['lab_manager'], body: labSettingsSchema }, async ({ user, body }) => ({ settings: await updateLabSettings(user, body) }));
