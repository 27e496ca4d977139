import { testDb, unique } from './db';

/** A client with one stallion, made directly in the database for tests that need a fresh owner. */
export async function makeStallion(name = unique('Test Stallion')) {
  const [clientId] = await testDb()('clients').insert({ name: unique('Owner'), kind: 'owner' });
  const [id] = await testDb()('stallions').insert({ name, client_id: clientId, registration: unique('REG') });
  return { id, clientId, name };
}

export const goodCollection = (stallionId: number, over: Record<string, unknown> = {}) => ({
  stallionId,
  collectedAt: '2026-06-01T09:00:00.000Z',
  volumeMl: 50,
  concentrationMethod: 'entered',
  concentrationMillionPerMl: 150,
  totalMotilityPct: 70,
  progressiveMotilityPct: 60,
  preparation: 'eosin_nigrosin',
  optics: 'bright_field',
  magnification: 1000,
  collectedBy: 'Test handler',
  remarks: null,
  ...over,
});

export async function counts() {
  const db = testDb();
  const one = async (t: string) => Number(((await db(t).count({ n: '*' }).first()) as { n: number }).n);
  return { clients: await one('clients'), stallions: await one('stallions'), collections: await one('collections'), testis: await one('testis_measurements'), audit: await one('audit_log') };
}
