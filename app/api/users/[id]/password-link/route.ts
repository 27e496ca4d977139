import { sendPasswordLink } from '@/db/queries/users';
import { route } from '@/lib/api/handler';
import { idParams } from '@/lib/validations/common';

/** Mails the user a one-time link to set a new password (or a fresh invitation if they never set one). */
export const POST = route({ roles: ['lab_manager'], params: idParams }, async ({ user, params }) => sendPasswordLink(user, params.id));
