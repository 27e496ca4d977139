import type { Knex } from 'knex';
import { DEMO_CLIENTS, DEMO_CLIENT_USER_EMAIL, DEMO_OTHER_CLIENT_USER_EMAIL, DEMO_STALLIONS } from '../../lib/demo/scenario';

// Re-runnable: clients are matched by name, stallions by registration; only missing rows are
// inserted and existing ones are left as they are (someone may have edited them in the demo).
export async function seed(knex: Knex): Promise<void> {
  await knex.transaction(async (trx) => {
    const clientIds = new Map<string, number>();
    for (const c of DEMO_CLIENTS) {
      const existing = await trx('clients').where({ name: c.name }).orderBy('id').first('id');
      if (existing) {
        clientIds.set(c.name, existing.id);
        continue;
      }
      const [id] = await trx('clients').insert({
        name: c.name,
        kind: c.kind,
        email: c.email,
        phone: c.phone,
        address: c.address,
        notes: c.notes,
      });
      clientIds.set(c.name, id);
    }

    // Each client user sees the stallions of the client with the same e-mail; never overwrite a
    // link someone has changed.
    for (const email of [DEMO_CLIENT_USER_EMAIL, DEMO_OTHER_CLIENT_USER_EMAIL]) {
      const portalClient = DEMO_CLIENTS.find((c) => c.email === email);
      if (!portalClient) throw new Error(`no demo client with e-mail ${email}`);
      await trx('users').where({ email }).whereNull('client_id').update({ client_id: clientIds.get(portalClient.name) });
    }

    for (const s of DEMO_STALLIONS) {
      const existing = await trx('stallions').where({ registration: s.registration }).first('id');
      if (existing) continue;
      const clientId = clientIds.get(s.clientName);
      if (clientId === undefined) throw new Error(`demo stallion ${s.name} names an unknown client ${s.clientName}`);
      await trx('stallions').insert({
        name: s.name,
        registration: s.registration,
        breed: s.breed,
        foaling_year: s.foalingYear,
        client_id: clientId,
        notes: s.notes,
      });
    }
  });
}
