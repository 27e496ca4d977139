// The demo sign-ins the seed creates (lib/demo/users.ts), by role, for the HTTP and browser tests.
import { DEMO_PASSWORD } from '../../lib/demo/users';

export { DEMO_PASSWORD };
export const USERS = {
  tech: 'tech@quillfield.example',
  reader: 'reader@quillfield.example',
  vet: 'vet@quillfield.example',
  manager: 'manager@quillfield.example',
  owner: 'owner@quillfield.example',
  otherOwner: 'bryony@fenwarde.example',
};
