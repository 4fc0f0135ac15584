import {
  applyPartToDesign,
  demoParts,
  KIND_FIELDS,
  PART_KINDS,
  PART_SLOT_KEYS,
  PART_SLOTS,
  parsePart,
  ratingCitations,
  safeParsePart,
  type Part,
  type PartOf,
} from '@/sim/parts';
import { DesignError, parseDesign, type DesignInput } from '@/sim';

function issuesOf(input: unknown) {
  const result = safeParsePart(input);
  if (result.ok) throw new Error('expected the part to be refused');
  return result.issues;
}

const byNumber = (number: string) => {
  const part = demoParts().find((candidate) => candidate.partNumber === number);
  if (!part) throw new Error(`no demo part ${number}`);
  return part;
};

describe('part schemas', () => {
  it('reads ratings with units into SI values', () => {
    const part = parsePart({
      kind: 'capacitor',
      partNumber: ' NF-CAP-940-900 ',
      capacitance: '940 µF',
      tolerance: '10 %',
      ratedVoltage: '900 V',
      surgeVoltage: '0.99 kV',
      esr: '3 mΩ',
    }) as PartOf<'capacitor'>;
    expect(part.partNumber).toBe('NF-CAP-940-900');
    expect(part.capacitance).toBeCloseTo(940e-6, 15);
    expect(part.tolerance).toBeCloseTo(0.1, 15);
    expect(part.surgeVoltage).toBe(990);
    expect(part.esr).toBeCloseTo(3e-3, 15);
  });

  it.each([
    ['resistor', { resistance: '4k7', pulseEnergy: '450 J', continuousPower: '50 W' }, 'resistance', 4700],
    ['inductor', { inductance: '22 µH', saturationCurrent: '60 A', dcr: '4 mΩ' }, 'inductance', 22e-6],
    ['contactor', { makeCurrent: '600 A', carryCurrent: '250 A' }, 'carryCurrent', 250],
    ['fuse', { meltingI2t: '18 kA²s' }, 'meltingI2t', 18_000],
    ['semiconductor', { blockingVoltage: '1.2 kV', surgeCurrent: '300 A', i2t: '450 A²s' }, 'blockingVoltage', 1200],
  ] as const)('accepts a %s', (kind, ratings, field, value) => {
    const part = parsePart({ kind, partNumber: `NF-${kind}`, ...ratings }) as unknown as Record<string, number>;
    expect(part[field]).toBeCloseTo(value, 9);
  });

  it('requires each kind’s main ratings', () => {
    for (const kind of PART_KINDS) {
      const issues = issuesOf({ kind, partNumber: 'NF-X' });
      expect(issues.map((issue) => issue.path).sort()).toEqual([...KIND_FIELDS[kind].required].sort());
      for (const issue of issues) expect(issue.message).toBe('is required');
    }
  });

  it.each<[string, Record<string, unknown>, string, RegExp]>([
    ['an unknown kind', { kind: 'transformer', partNumber: 'X' }, 'kind', /must be one of capacitor, resistor/],
    [
      'a rating of another kind',
      { kind: 'resistor', partNumber: 'X', resistance: 1, capacitance: 1e-6 },
      'capacitance',
      /does not apply/,
    ],
    ['an unknown field', { kind: 'resistor', partNumber: 'X', resistance: 1, colour: 'red' }, 'colour', /unknown field/],
    [
      'a wrong unit',
      { kind: 'capacitor', partNumber: 'X', capacitance: '5 V', ratedVoltage: 1 },
      'capacitance',
      /expected a capacitance/,
    ],
    [
      'a negative ESR',
      { kind: 'capacitor', partNumber: 'X', capacitance: 1e-3, ratedVoltage: 1, esr: -1 },
      'esr',
      /must not be negative/,
    ],
    ['a zero resistance', { kind: 'resistor', partNumber: 'X', resistance: 0 }, 'resistance', /greater than 0/],
    [
      'a tolerance of 100 %',
      { kind: 'resistor', partNumber: 'X', resistance: 1, tolerance: '100 %' },
      'tolerance',
      /below 100 %/,
    ],
    [
      'a surge voltage below the rated voltage',
      { kind: 'capacitor', partNumber: 'X', capacitance: 1e-3, ratedVoltage: 450, surgeVoltage: 400 },
      'surgeVoltage',
      /not be below the rated/,
    ],
    ['an empty part number', { kind: 'fuse', partNumber: '  ', meltingI2t: 10 }, 'partNumber', /is required/],
  ])('refuses %s, naming the field', (_label, input, path, message) => {
    const issue = issuesOf(input).find((candidate) => candidate.path === path);
    expect(issue).toBeDefined();
    expect(issue?.message).toMatch(message);
  });

  it('parsePart throws a DesignError with the issues', () => {
    expect(() => parsePart({ kind: 'fuse', partNumber: 'X' })).toThrow(DesignError);
  });
});

describe('demo parts', () => {
  it('are all valid, one or more of every kind, with unique part numbers', () => {
    const parts = demoParts();
    expect(new Set(parts.map((part) => part.kind))).toEqual(new Set(PART_KINDS));
    expect(new Set(parts.map((part) => part.partNumber)).size).toBe(parts.length);
  });

  it('belong to the fictional Northfold Motion and name no real maker', () => {
    for (const part of demoParts()) {
      expect(part.partNumber).toMatch(/^NF-[A-Z]+-[0-9A-Z]+-[0-9A-Z]+$/);
      expect(part.maker).toMatch(/^Northfold Motion/);
    }
  });

  it('include the depot charger’s DC-link capacitor NF-CAP-940-900', () => {
    const cap = byNumber('NF-CAP-940-900') as PartOf<'capacitor'>;
    expect(cap.capacitance).toBeCloseTo(940e-6, 15);
    expect(cap.ratedVoltage).toBe(900);
  });
});

describe('applyPartToDesign', () => {
  const depot: DesignInput = {
    name: 'Depot charger DC link',
    source: { voltage: '800 V', resistance: '20 mΩ', inductance: '10 µH' },
    precharge: { resistance: '33 Ω', bypass: { fraction: 0.95, delay: '20 ms' } },
    capacitor: { capacitance: '1 mF' },
    duration: '1 s',
    ratings: { capacitorVoltage: '850 V', capacitorSurgeVoltage: '900 V', contactorCarryCurrent: '100 A' },
  };

  it('a capacitor part sets the capacitance, the ESR and both voltage ratings, and cites the part', () => {
    const cap = { ...byNumber('NF-CAP-940-900'), id: 'part-17' } as Part;
    const applied = applyPartToDesign(depot, 'capacitor', cap);
    expect(applied.partRefs).toEqual({ capacitor: 'part-17' });
    expect(applied.written).toEqual([
      'capacitor.capacitance',
      'capacitor.esr',
      'ratings.capacitorVoltage',
      'ratings.capacitorSurgeVoltage',
    ]);
    const design = parseDesign(applied.design);
    expect(design.capacitor.capacitance).toBeCloseTo(940e-6, 15);
    expect(design.capacitor.esr).toBeCloseTo(3e-3, 15);
    expect(design.ratings.capacitorVoltage).toBe(900);
    expect(design.ratings.capacitorSurgeVoltage).toBe(990);
    expect(design.ratings.contactorCarryCurrent).toBe(100); // another slot's rating is left alone
  });

  it('a resistor used as the precharge sets its resistance and pulse ratings and keeps the bypass', () => {
    const resistor = byNumber('NF-RES-47R-PRE');
    const applied = applyPartToDesign(depot, 'precharge', resistor, { capacitor: 'part-17' });
    expect(applied.partRefs).toEqual({ capacitor: 'part-17', precharge: 'NF-RES-47R-PRE' }); // no id yet: the part number
    const design = parseDesign(applied.design);
    expect(design.precharge?.resistance).toBe(47);
    expect(design.precharge?.bypass?.delay).toBeCloseTo(0.02, 15);
    expect(design.ratings.prechargePulseEnergy).toBe(450);
    expect(design.ratings.prechargeContinuousPower).toBe(50);
    expect(design.ratings.prechargePeakPower).toBe(20_000);
  });

  it('an inductor as the filter sets the inductance, its DCR as the filter resistance, and the saturation rating', () => {
    const design = parseDesign(applyPartToDesign(depot, 'filterInductor', byNumber('NF-IND-10U-40A')).design);
    expect(design.filter).toEqual({ inductance: 10e-6, resistance: 2.5e-3 });
    expect(design.ratings.inductorSaturationCurrent).toBe(40);
  });

  it('contactor, fuse, diode and switch parts set only their ratings', () => {
    let input = depot;
    input = applyPartToDesign(input, 'bypassContactor', byNumber('NF-CON-800-250')).design;
    input = applyPartToDesign(input, 'fuse', byNumber('NF-FUS-250-1000')).design;
    input = applyPartToDesign(input, 'diode', byNumber('NF-DIO-800-150')).design;
    input = applyPartToDesign(input, 'switch', byNumber('NF-SW-1200-60')).design;
    const design = parseDesign(input);
    expect(design.ratings).toMatchObject({
      contactorMakeCurrent: 600,
      contactorCarryCurrent: 250,
      fuseMeltingI2t: 18_000,
      diodeSurgeCurrent: 150,
      diodeI2t: 112,
      switchVoltage: 1200,
    });
  });

  it('removes a rating the part does not give, and keeps a circuit value it does not give', () => {
    // NF-CAP-1U2-1000 has no surge voltage and no ESR.
    const design = { ...depot, capacitor: { capacitance: '1 mF', esr: '5 mΩ' } };
    const applied = applyPartToDesign(design, 'capacitor', byNumber('NF-CAP-1U2-1000'));
    expect(applied.cleared).toEqual(['ratings.capacitorSurgeVoltage']);
    const parsed = parseDesign(applied.design);
    expect(parsed.ratings.capacitorSurgeVoltage).toBeUndefined();
    expect(parsed.capacitor.esr).toBeCloseTo(5e-3, 15);
  });

  it('never changes the design it is given', () => {
    const before = JSON.stringify(depot);
    applyPartToDesign(depot, 'capacitor', byNumber('NF-CAP-940-900'));
    expect(JSON.stringify(depot)).toBe(before);
  });

  it('refuses a part of the wrong kind for the slot, naming the slot', () => {
    expect(() => applyPartToDesign(depot, 'precharge', byNumber('NF-CAP-940-900'))).toThrow(
      /precharge resistor takes a resistor, not a capacitor/,
    );
    try {
      applyPartToDesign(depot, 'fuse', byNumber('NF-CON-800-250'));
    } catch (error) {
      expect((error as DesignError).issues[0].path).toBe('slot');
    }
  });

  it('every slot writes only fields and rating keys the design schema knows', () => {
    for (const slot of PART_SLOT_KEYS) {
      const part = demoParts().find((candidate) => candidate.kind === PART_SLOTS[slot].kind) as Part;
      const base: DesignInput = { ...depot, damping: { resistance: 1, capacitance: 1e-6 }, bleeder: { resistance: 2200 } };
      expect(() => parseDesign(applyPartToDesign(base, slot, part).design)).not.toThrow();
    }
  });

  it('ratingCitations says which part each rating came from', () => {
    const parts = [{ ...byNumber('NF-CAP-1U2-1000'), id: 'p1' } as Part, byNumber('NF-CON-800-250')];
    const citations = ratingCitations({ capacitor: 'p1', bypassContactor: 'NF-CON-800-250', fuse: 'gone' }, parts);
    expect(citations.capacitorVoltage).toEqual({ slot: 'capacitor', partId: 'p1', partNumber: 'NF-CAP-1U2-1000' });
    expect(citations.capacitorSurgeVoltage).toBeUndefined(); // that part gives none
    expect(citations.contactorMakeCurrent?.partNumber).toBe('NF-CON-800-250');
    expect(citations.fuseMeltingI2t).toEqual({ slot: 'fuse', partId: 'gone', partNumber: null });
  });
});
