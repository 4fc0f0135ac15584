// The check command gates a pipeline on the margins: exit 1 when a rating check fails, 0 when all
// pass or only warn, 2 on invalid input; --json carries the checks and the notices.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { main } from '@/sim/cli';

let dir: string;
beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-cli-ratings-'));
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

function write(name: string, design: unknown): string {
  const file = path.join(dir, name);
  fs.writeFileSync(file, JSON.stringify(design));
  return file;
}

// Derived: 48 V step into 0.1 H, 280 Ω, 0.4 µF from rest peaks at 67.20 V (REFERENCE §1 case A,
// a step-response example in Nilsson & Riedel, Electric Circuits, ch. 8 — book example from memory).
const caseA = (capacitorVoltage: string) => ({
  source: { voltage: '48 V', resistance: '280 Ω', inductance: '0.1 H' },
  capacitor: { capacitance: '0.4 uF' },
  duration: '3 ms',
  ratings: { capacitorVoltage },
});

function run(files: string[]) {
  const lines: string[] = [];
  const status = main(['check', ...files, '--json'], (l) => lines.push(l), () => undefined);
  return { status, outputs: lines.map((l) => JSON.parse(l)) };
}

it('exits 0 when the 67.2 V peak sits inside the derated limit (100 V × 0.8 = 80 V)', () => {
  const { status, outputs } = run([write('pass.json', caseA('100 V'))]);
  expect(status).toBe(0);
  const check = outputs[0].checks.find((c: { id: string }) => c.id === 'capacitor-voltage');
  expect(check).toMatchObject({ status: 'pass', limit: 100, deratedLimit: 80 });
  expect(check.value).toBeCloseTo(67.2, 1);
  // (80 − 67.20)/80 = 16.0 % headroom.
  expect(check.marginPercent).toBeCloseTo(16.0, 0);
  expect(Object.keys(check)).toEqual(expect.arrayContaining(['id', 'label', 'value', 'limit', 'deratedLimit', 'marginPercent', 'status', 'basis']));
});

it('exits 0 on a warning: 67.2 V is past 75 V × 0.8 = 60 V but inside the 75 V rating', () => {
  const { status, outputs } = run([write('warn.json', caseA('75 V'))]);
  expect(status).toBe(0);
  expect(outputs[0].checks.find((c: { id: string }) => c.id === 'capacitor-voltage').status).toBe('warn');
});

it('exits 1 when the peak is over the rating itself, and says so in the check', () => {
  const { status, outputs } = run([write('fail.json', caseA('63 V'))]);
  expect(status).toBe(1);
  const check = outputs[0].checks.find((c: { id: string }) => c.id === 'capacitor-voltage');
  expect(check.status).toBe('fail');
  expect(check.marginPercent).toBeLessThan(0);
});

it('exits 2 for an invalid file even when another file fails its margins', () => {
  const bad = write('bad.json', { source: { voltage: '48 V' }, capacitor: { capacitance: '5 V' } });
  const { status, outputs } = run([write('fail2.json', caseA('63 V')), bad]);
  expect(status).toBe(2);
  expect(outputs[1].error.issues[0].path).toBe('capacitor.capacitance');
});

it('reports every rating as not checked when the design names none', () => {
  const design = { ...caseA('1 V'), ratings: undefined };
  const { status, outputs } = run([write('none.json', design)]);
  expect(status).toBe(0);
  const ratingChecks = outputs[0].checks.filter((c: { id: string }) => c.id !== 'discharge');
  expect(ratingChecks.length).toBeGreaterThan(5);
  expect(ratingChecks.every((c: { status: string }) => c.status === 'not-checked')).toBe(true);
});

it('carries the high-voltage notice once the 48 V step rings past 60 V, and none for a 24 V step (peak 33.6 V)', () => {
  const ringing = run([write('ring48.json', caseA('100 V'))]).outputs[0];
  expect(ringing.notices.map((n: { id: string }) => n.id)).toContain('high-voltage');
  const low = { ...caseA('100 V'), source: { ...caseA('100 V').source, voltage: '24 V' } };
  const quiet = run([write('ring24.json', low)]).outputs[0];
  expect(quiet.metrics.peakCapacitorVoltage.value).toBeCloseTo(33.6, 1);
  expect(quiet.notices.map((n: { id: string }) => n.id)).not.toContain('high-voltage');
});

it('adds the high-voltage notice to the depot charger example (800 V)', () => {
  const { outputs } = run([path.join(__dirname, '..', '..', 'examples', 'dc-link-precharge.json')]);
  const notice = outputs[0].notices.find((n: { id: string }) => n.id === 'high-voltage');
  expect(notice.text).toMatch(/design aid/);
  expect(notice.text).toMatch(/qualified, licensed/);
});
