// The design file's optional tolerances section: parsed to SI and kept by parseDesign, bad entries
// named by path, and a design without it parses as before.
import { parseDesign, safeParseDesign } from '@/sim';
import lcFilter from '@/examples/lc-filter.json';

describe('design tolerances', () => {
  it('are kept by parseDesign, in SI', () => {
    const design = parseDesign({
      ...lcFilter,
      tolerances: { 'capacitor.capacitance': { percent: '10 %', drift: -20 }, 'source.voltage': { min: '90 V', max: '100 V' } },
    });
    expect(design.tolerances?.['capacitor.capacitance']).toEqual({ percent: 10, drift: -20 });
    expect(design.tolerances?.['source.voltage']).toEqual(expect.objectContaining({ min: 90, max: 100 }));
  });

  it('are absent when the file has none', () => {
    expect(parseDesign(lcFilter).tolerances).toBeUndefined();
  });

  it('name a bad entry by its path', () => {
    const result = safeParseDesign({ ...lcFilter, tolerances: { 'capacitor.colour': { percent: 5 } } });
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.issues[0].path).toBe('tolerances.capacitor.colour');
  });
});
