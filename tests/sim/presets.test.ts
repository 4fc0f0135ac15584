import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';

import { parseDesign } from '@/sim/design';
import { presets } from '@/sim/presets';
import { simulate } from '@/sim/simulate';

const root = resolve(__dirname, '../..');

describe('presets', () => {
  it('are the four demo designs, each with an example file of the same content', () => {
    expect(presets.map((p) => p.id)).toEqual(['dc-link-precharge', 'lc-filter', 'hot-plug', 'switch-turn-off']);
    for (const preset of presets) {
      const file = JSON.parse(readFileSync(resolve(root, 'examples', `${preset.id}.json`), 'utf8'));
      expect(file).toEqual(preset.design);
    }
  });

  it.each(presets.map((p) => [p.id, p] as const))('%s checks cleanly on its expected solver path', (_id, preset) => {
    const design = parseDesign(preset.design);
    expect(Object.keys(design.ratings).length).toBeGreaterThan(0);
    const result = simulate(design, { points: 200 });
    expect(result.warnings).toEqual([]);
    expect(result.solvers.maxDisagreement.vC).toBeLessThan(1e-6);
    expect(result.solvers.maxDisagreement.i).toBeLessThan(1e-6);
    const path = { 'dc-link-precharge': 'exact', 'lc-filter': 'odex', 'hot-plug': 'exact', 'switch-turn-off': 'exact' }[
      preset.id
    ];
    expect(result.solvers.waveformFrom).toBe(path);
    if (preset.id === 'dc-link-precharge') {
      expect(result.solvers.stiff).toBe(true);
      expect(result.metrics.bypassTime).not.toBeNull();
    }
    if (preset.id === 'hot-plug') expect(result.solvers.ran).toContain('closed-form');
  });
});
