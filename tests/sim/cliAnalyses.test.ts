// `check --spread … --stability` adds the spread and stability objects to the --json output.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { main } from '@/sim/cli';
import lcFilter from '@/examples/lc-filter.json';

jest.setTimeout(60_000);

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-cli-'));
const withTolerances = path.join(dir, 'lc.json');
const without = path.join(dir, 'plain.json');
fs.writeFileSync(withTolerances, JSON.stringify({ ...lcFilter, tolerances: { 'capacitor.capacitance': { percent: 10 }, 'source.voltage': { percent: 5 } } }));
fs.writeFileSync(without, JSON.stringify(lcFilter));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

async function run(args: string[]) {
  const out: string[] = [];
  const err: string[] = [];
  const status = await main(args, (l) => out.push(l), (l) => err.push(l));
  return { status, out, err };
}

describe('check --spread and --stability', () => {
  it('add spread and stability to the JSON', async () => {
    const r = await run(['check', withTolerances, '--json', '--spread', 'monte-carlo', '--samples', '50', '--seed', '9', '--stability']);
    const o = JSON.parse(r.out[0]);
    expect(o.spread).toEqual(expect.objectContaining({ status: 'complete', method: 'monte-carlo', samples: 50, seed: 9 }));
    expect(o.stability).toEqual(expect.objectContaining({ stable: true, marginDb: expect.any(Number) }));
    const corners = JSON.parse((await run(['check', withTolerances, '--json', '--spread=corners'])).out[0]);
    expect(corners.spread.samples).toBe(4);
    expect(corners.stability).toBeUndefined();
  });

  it('say why a spread cannot run, and refuse bad arguments', async () => {
    const r = await run(['check', without, '--json', '--spread', 'corners']);
    expect(r.status).toBe(2);
    expect(JSON.parse(r.out[0]).spread.error.issues[0].path).toBe('tolerances');
    expect((await run(['check', without, '--spread', 'sideways'])).status).toBe(2);
    expect((await run(['check', without, '--spread', 'monte-carlo', '--samples', '100001'])).err[0]).toMatch(/--samples/);
    expect((await run(['check', without, '--seed', '3'])).err[0]).toMatch(/monte-carlo/);
  });
});
