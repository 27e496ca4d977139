import { describe, expect, it } from 'vitest';
import { Session } from '../support/http';

describe('/api/health', () => {
  it('reports the database and object store as up', async () => {
    const r = await new Session().json('/api/health');
    expect(r.status).toBe(200);
    expect(r.body).toEqual({ status: 'ok', database: 'up', objectStore: 'up' });
  });
});
