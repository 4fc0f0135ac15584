import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

import { checkDesignFile, main } from '@/sim/cli';

const root = resolve(__dirname, '../..');
const METRIC_KEYS = [
  'peakCapacitorVoltage',
  'minCapacitorVoltage',
  'peakBusVoltage',
  'peakCurrent',
  'i2t',
  'prechargeEnergy',
  'prechargePeakPower',
  'bypassTime',
  'residualStep',
  'peakCurrentAfterBypass',
  'i2tAfterBypass',
  'finalCapacitorVoltage',
  'steadyStateVoltage',
  'overshootPercent',
  'alpha',
  'omegaN',
  'zeta',
  'omegaD',
  'q',
  'classification',
  'prechargePhase',
  'storedEnergyAtPeak',
  'timeTo95',
];

let dir: string;
let good: string;
let bad: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'ringwell-cli-'));
  good = join(dir, 'good.json');
  bad = join(dir, 'bad.json');
  writeFileSync(
    good,
    JSON.stringify({
      name: 'hot plug',
      source: { voltage: '48 V', resistance: '15 mΩ', inductance: '0.5 µH' },
      capacitor: { capacitance: '1.5 mF', esr: '5 mΩ' },
      duration: '1 ms',
    }),
  );
  writeFileSync(bad, JSON.stringify({ source: { voltage: '48 V' }, capacitor: { capacitance: '-1 mF' }, duration: '1 ms' }));
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

function cli(args: string[]) {
  return spawnSync('npx', ['tsx', 'sim/cli.ts', ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
}

describe('npx tsx sim/cli.ts check', () => {
  it('--json prints one object per file per line, in order, and exits 2 when a file is invalid', () => {
    const run = cli(['check', good, bad, '--json', '--points', '50']);
    expect(run.status).toBe(2);
    const lines = run.stdout.trim().split('\n');
    expect(lines).toHaveLength(2);
    const [first, second] = lines.map((line) => JSON.parse(line));
    expect(first.file).toBe(good);
    expect(Object.keys(first.metrics).sort()).toEqual([...METRIC_KEYS].sort());
    expect(first.metrics.peakCapacitorVoltage).toEqual({ value: expect.any(Number), time: expect.any(Number) });
    expect(first.metrics.bypassTime).toBeNull();
    expect(first.solvers.ran).toEqual(['exact', 'closed-form', 'odex']);
    expect(first.solvers.waveformFrom).toBe('exact');
    expect(second).toEqual({
      file: bad,
      error: {
        message: expect.stringContaining('capacitor.capacitance'),
        issues: [{ path: 'capacitor.capacitance', message: expect.stringMatching(/negative/) }],
      },
    });
  }, 120_000);

  it('prints a readable summary and exits 0 when every file checks', () => {
    const run = cli(['check', good]);
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/peak capacitor voltage\s+54\.1 V at 103 µs/);
    expect(run.stdout).toMatch(/solvers\s+exact, closed-form, odex/);
  }, 120_000);
});

describe('the check command in process', () => {
  it('rejects bad arguments with status 2', () => {
    const errors: string[] = [];
    const sink = (line: string) => errors.push(line);
    expect(main([], sink, sink)).toBe(2);
    expect(main(['check'], sink, sink)).toBe(2);
    expect(main(['check', good, '--points', '1'], sink, sink)).toBe(2);
    expect(main(['check', good, '--points', '200001'], sink, sink)).toBe(2);
    expect(main(['check', good, '--fast'], sink, sink)).toBe(2);
    expect(errors.join('\n')).toMatch(/usage/);
  });

  it('reports an unreadable or malformed file as an error object', () => {
    const broken = join(dir, 'broken.json');
    writeFileSync(broken, '{ "source": ');
    expect(checkDesignFile(broken)).toEqual({
      file: broken,
      error: { message: expect.stringMatching(/not valid JSON/), issues: [expect.any(Object)] },
    });
    expect(checkDesignFile(join(dir, 'missing.json'))).toEqual({
      file: join(dir, 'missing.json'),
      error: expect.objectContaining({ message: expect.stringMatching(/cannot be read/) }),
    });
  });

  it('keeps the order of the files in --json output', () => {
    const lines: string[] = [];
    expect(
      main(
        ['check', bad, good, '--json', '--points', '20'],
        (line) => lines.push(line),
        () => undefined,
      ),
    ).toBe(2);
    expect(lines.map((line) => JSON.parse(line).file)).toEqual([bad, good]);
  });
});
