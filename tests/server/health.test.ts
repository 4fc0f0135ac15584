import request from 'supertest';
import type { DatabaseHandle } from '@/db/client';
import { createApp } from '@/server/app';
import { openTestDatabase } from '@/tests/helpers/testDatabase';
import pkg from '@/package.json';

jest.setTimeout(60_000);

let database: DatabaseHandle;
beforeAll(async () => {
  database = await openTestDatabase();
});
afterAll(async () => {
  await database.close();
});

describe('GET /api/health', () => {
  it('reports the version, a working database and the uptime', async () => {
    const app = createApp({ database, webDir: null });
    const res = await request(app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'ok', version: pkg.version, database: 'ok' });
    expect(typeof res.body.uptimeSeconds).toBe('number');
  });
});

describe('the JSON error shape', () => {
  const app = () => createApp({ database, webDir: null, log: () => undefined });

  it('answers an unknown API route with a 404 in the common shape', async () => {
    const res = await request(app()).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/json/);
    expect(res.body).toEqual({ error: { code: 'not_found', message: expect.stringContaining('/no-such-thing') } });
  });

  it('answers a malformed JSON body with a 400 and no stack trace', async () => {
    const res = await request(app()).post('/api/health').set('Content-Type', 'application/json').send('{"broken": ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('malformed_json');
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.(js|ts):\d+/);
  });
});
