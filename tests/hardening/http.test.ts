// HTTP hardening from the outside (issue 10): security headers, the body size limit, CORS closed by
// default, the analysis rate limit, the request timeout, the points cap, no stack traces or SQL in
// answers, and formula-safe CSV.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import express from 'express';
import request from 'supertest';
import { createTestWorld, type TestWorld } from '@/tests/helpers/testApp';
import { makeDesign, makeProject, makeRevision, prechargePreset, sizingRequest } from '@/tests/helpers/fixtures';
import { requestTimeout } from '@/server/http/hardening';
import { errorHandler } from '@/server/errors';
import { createApp } from '@/server/app';

jest.setTimeout(120_000);

let world: TestWorld;
let design: Record<string, unknown>;
beforeAll(async () => {
  world = await createTestWorld({ analysisRateLimit: { limit: 3, windowMs: 60_000 }, corsOrigins: ['https://allowed.northfold.example'] });
  design = (await prechargePreset(world)).design;
});
afterAll(async () => {
  await world.close();
});

const expectCommonShape = (body: unknown, code?: string) => {
  expect(body).toEqual({ error: expect.objectContaining({ code: code ?? expect.any(String), message: expect.any(String) }) });
};

describe('HTTP hardening', () => {
  it('sends helmet headers on the API', async () => {
    const res = await request(world.app).get('/api/health');
    expect(res.headers['content-security-policy']).toContain("default-src 'none'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['strict-transport-security']).toBeDefined();
    expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });

  it('sends a CSP fit for the Expo web export on the web app', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-web-'));
    fs.writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>Ringwell</title>');
    try {
      const web = createApp({ database: world.database, webDir: dir, log: () => undefined });
      const res = await request(web).get('/designs').expect(200);
      const csp = res.headers['content-security-policy'];
      expect(csp).toContain("default-src 'self'");
      expect(csp).toContain("script-src 'self'");
      expect(csp).not.toMatch(/script-src[^;]*unsafe/);
      expect(csp).toContain("frame-ancestors 'none'");
      expect(res.headers['x-content-type-options']).toBe('nosniff');
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it('refuses a JSON body over 1 MB with 413 in the common shape', async () => {
    const sam = await world.as('engineer');
    const big = { design: { ...design, notes: 'x'.repeat(1_100_000) } };
    const res = await sam.post('/api/check').send(big);
    expect(res.status).toBe(413);
    expectCommonShape(res.body, 'body_too_large');
  });

  it('refuses malformed JSON with 400 in the common shape', async () => {
    const res = await request(world.app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"email": ');
    expect(res.status).toBe(400);
    expectCommonShape(res.body, 'malformed_json');
  });

  it('keeps CORS closed unless the origin is listed', async () => {
    const stranger = await request(world.app).get('/api/health').set('Origin', 'https://evil.example');
    expect(stranger.headers['access-control-allow-origin']).toBeUndefined();
    const preflight = await request(world.app).options('/api/check').set('Origin', 'https://evil.example').set('Access-Control-Request-Method', 'POST');
    expect(preflight.headers['access-control-allow-origin']).toBeUndefined();
    const friend = await request(world.app).get('/api/health').set('Origin', 'https://allowed.northfold.example');
    expect(friend.headers['access-control-allow-origin']).toBe('https://allowed.northfold.example');
    // With no option and no CORS_ORIGINS, nobody gets the header.
    expect(process.env.CORS_ORIGINS).toBeUndefined();
    const closed = createApp({ database: world.database, webDir: null, log: () => undefined });
    const res = await request(closed).get('/api/health').set('Origin', 'https://allowed.northfold.example');
    expect(res.headers['access-control-allow-origin']).toBeUndefined();
  });

  it('rate-limits the analysis endpoints per user with 429 in the common shape', async () => {
    const viewer = await world.as('viewer');
    for (let k = 0; k < 3; k++) await viewer.post('/api/check').send({ design, points: 100, includeWaveform: false }).expect(200);
    const limited = await viewer.post('/api/precharge/size').send(sizingRequest);
    expect(limited.status).toBe(429);
    expectCommonShape(limited.body, 'rate_limited');
    expect(Number(limited.headers['retry-after'])).toBeGreaterThan(0);
    // Reads are not limited; another user has their own budget.
    await viewer.get('/api/presets').expect(200);
    const reviewer = await world.as('reviewer');
    await reviewer.post('/api/precharge/size').send(sizingRequest).expect(200);
  });

  it('caps the points of a job', async () => {
    const sam = await world.as('admin');
    const res = await sam.post('/api/check').send({ design: { ...design, points: 200_001 } });
    // An invalid design answers 422 (the request is well-formed), naming the field.
    expect(res.status).toBe(422);
    expect(JSON.stringify(res.body)).toMatch(/design\.points/);
    const tooMany = await sam.post('/api/check').send({ design, points: 1_000_000 });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.fields.map((f: { path: string }) => f.path)).toContain('points');
  });

  it('answers 503 in the common shape when a request runs past the timeout', async () => {
    const app = express();
    app.use(requestTimeout(50));
    app.get('/slow', (_req, res) => {
      setTimeout(() => (res.headersSent ? undefined : res.json({ late: true })), 300);
    });
    app.use(errorHandler(() => undefined));
    const res = await request(app).get('/slow');
    expect(res.status).toBe(503);
    expectCommonShape(res.body, 'timeout');
  });

  it('shows no stack trace or SQL when the database fails', async () => {
    const broken = await createTestWorld();
    try {
      const agent = await broken.as('engineer');
      await broken.database.pg.exec('drop table projects cascade');
      const res = await agent.get('/api/projects');
      expect(res.status).toBe(500);
      expectCommonShape(res.body, 'internal');
      const text = JSON.stringify(res.body);
      expect(text).not.toMatch(/select|from "|relation|projects|at .*\.ts|Error:|stack/i);
    } finally {
      await broken.close();
    }
  });

  it('writes formula-safe CSV for hostile names', async () => {
    const project = await makeProject(world, '=HYPERLINK("https://evil.example","x")');
    const d = await makeDesign(world, project.id, design, '+cmd|" /C calc"!A0');
    const rev = await makeRevision(world, d.id);
    const res = await (await world.as('viewer')).get(`/api/revisions/${rev.id}/waveforms.csv`).expect(200);
    const cells = res.text.split(/\r?\n/).flatMap((line) => line.split(',')).map((c) => c.replace(/^"/, ''));
    expect(res.text).toContain("'=HYPERLINK");
    expect(res.text).toContain("'+cmd");
    for (const cell of cells) expect(cell).not.toMatch(/^[=+@]/);
  });
});
