// The CLI on a mains design (dispatch on the `mains` key): same output keys, the rectifier checks.
import path from 'node:path';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import { checkDesignFile, formatSummary, isFailure, spreadOfFile } from '@/sim/cli';

const example = path.join(__dirname, '..', '..', 'examples', 'mains-wall-charger.json');

describe('sim/cli.ts check on a mains design', () => {
  it('answers with metrics, solvers, checks and notices, including the diode checks', () => {
    const output = checkDesignFile(example);
    if (isFailure(output)) throw new Error(output.error.message);
    expect(Object.keys(output)).toEqual(expect.arrayContaining(['metrics', 'solvers', 'checks', 'notices']));
    const ids = output.checks.map((c) => c.id);
    expect(ids).toEqual(expect.arrayContaining(['diode-surge-current', 'diode-i2t', 'fuse-i2t']));
    expect((output.metrics as unknown as { surgeEquivalentCurrent: number }).surgeEquivalentCurrent).toBeGreaterThan(0);
    expect(formatSummary(output)).toMatch(/surge equivalent .* half-sine/);
  });

  it('names the field of a bad mains design', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'rw-cli-mains-'));
    const file = path.join(dir, 'bad.json');
    writeFileSync(file, JSON.stringify({ mains: { voltage: '230 V', frequency: '5 kHz', lineResistance: '0.3 Ω' }, capacitor: { capacitance: '470 µF' } }));
    const output = checkDesignFile(file);
    expect(isFailure(output)).toBe(true);
    if (isFailure(output)) expect(output.error.issues.map((i) => i.path)).toContain('mains.frequency');
  });

  it('spreads a mains design over its own tolerances section, on the mains engine', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'rw-cli-mains-'));
    const file = path.join(dir, 'with-tolerances.json');
    const design = JSON.parse(readFileSync(example, 'utf8'));
    writeFileSync(file, JSON.stringify({ ...design, tolerances: { 'mains.voltage': { percent: 10 } } }));
    const spread = await spreadOfFile(file, { method: 'corners' });
    if ('error' in spread) throw new Error(spread.error.message);
    expect(spread.status).toBe('complete');
    if (spread.status !== 'complete') return;
    expect(spread.samples).toBe(2);
    const check = checkDesignFile(file);
    if (isFailure(check)) throw new Error(check.error.message);
    check.spread = spread;
    expect(formatSummary(check)).toMatch(/spread\s+corners, 2 samples/);
    // A DC-only path on a mains design is refused naming the path.
    writeFileSync(file, JSON.stringify({ ...design, tolerances: { 'source.voltage': { percent: 10 } } }));
    const refused = await spreadOfFile(file, { method: 'corners' });
    expect('error' in refused && refused.error.issues.map((i) => i.path).join(' ')).toMatch(/source\.voltage/);
  }, 120_000);
});
