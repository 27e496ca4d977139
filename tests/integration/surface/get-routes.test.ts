import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoIds, fill, GET_ROUTES, type DemoIds, type Visitor } from '../../support/surface';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';

// Every GET route of tests/support/surface.ts as every role: 200 for the roles listed, 401 or 403
// (or 404 for a record the role may not see) for the others, and never a 5xx.
afterAll(closeTestDb);

const EMAIL: Record<Exclude<Visitor, 'anonymous'>, string> = { technician: USERS.tech, veterinarian: USERS.vet, lab_manager: USERS.manager, client: USERS.owner };
let ids: DemoIds;
const sessions = {} as Record<Visitor, Session>;

beforeAll(async () => {
  ids = await demoIds(testDb());
  sessions.anonymous = new Session();
  for (const [role, email] of Object.entries(EMAIL)) sessions[role as Visitor] = await signedIn(email);
});

describe('every GET API route, as every role', () => {
  for (const visitor of ['anonymous', 'technician', 'veterinarian', 'lab_manager', 'client'] as const) {
    it(`as ${visitor}`, async () => {
      const failures: string[] = [];
      for (const route of GET_ROUTES) {
        const path = fill(route.path, ids);
        const res = await sessions[visitor].fetch(path);
        await res.arrayBuffer();
        const allowed = route.roles.includes(visitor);
        const ok = allowed ? res.status === 200 : [401, 403, 404].includes(res.status);
        if (!ok || res.status >= 500) failures.push(`${path}: ${res.status} (expected ${allowed ? 200 : '401/403/404'})`);
      }
      expect(failures).toEqual([]);
    });
  }
});
