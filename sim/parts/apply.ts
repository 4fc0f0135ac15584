/**
 * A design can take a part instead of typed values: `applyPartToDesign` writes the part's values and
 * ratings into the design file and records which part fills which slot (`partRefs`), so that the
 * checks can cite the part ("capacitor voltage rating 900 V, from NF-CAP-940-900").
 *
 * The values are copied: a revision keeps the numbers it was checked with even if the part is edited
 * later. The slot owns its rating keys: a rating the part does not give is removed from the design
 * (its check becomes "not checked" rather than citing a number that belongs to another part). A
 * circuit value the part does not give (a capacitor without an ESR) keeps the design's value, because
 * dropping it would silently change the simulated circuit.
 */
import type { DesignInput, RatingKey } from '../design';
import { DesignError } from '../errors';
import { KIND_LABELS, type Part, type PartKind } from './schema';

type Section = 'capacitor' | 'precharge' | 'filter' | 'damping' | 'bleeder';

interface Write {
  /** Where the value goes: a design section and field, or a rating key. */
  target: { section: Section; field: string } | { rating: RatingKey };
  /** The part field it comes from. */
  from: string;
  /** A value the circuit needs (kept when the part lacks it) rather than a rating (removed). */
  circuit: boolean;
}

interface SlotInfo {
  kind: PartKind;
  label: string;
  writes: Write[];
}

const value = (section: Section, field: string, from: string): Write => ({ target: { section, field }, from, circuit: true });
const rating = (key: RatingKey, from: string): Write => ({ target: { rating: key }, from, circuit: false });

export const PART_SLOTS = {
  capacitor: {
    kind: 'capacitor',
    label: 'DC-link capacitor',
    writes: [
      value('capacitor', 'capacitance', 'capacitance'),
      value('capacitor', 'esr', 'esr'),
      rating('capacitorVoltage', 'ratedVoltage'),
      rating('capacitorSurgeVoltage', 'surgeVoltage'),
    ],
  },
  precharge: {
    kind: 'resistor',
    label: 'Precharge resistor',
    writes: [
      value('precharge', 'resistance', 'resistance'),
      rating('prechargePulseEnergy', 'pulseEnergy'),
      rating('prechargePeakPower', 'peakPower'),
      rating('prechargeContinuousPower', 'continuousPower'),
    ],
  },
  filterInductor: {
    kind: 'inductor',
    label: 'Filter inductor',
    writes: [
      value('filter', 'inductance', 'inductance'),
      value('filter', 'resistance', 'dcr'),
      rating('inductorSaturationCurrent', 'saturationCurrent'),
    ],
  },
  dampingResistor: { kind: 'resistor', label: 'Damping resistor', writes: [value('damping', 'resistance', 'resistance')] },
  dampingCapacitor: { kind: 'capacitor', label: 'Damping capacitor', writes: [value('damping', 'capacitance', 'capacitance')] },
  bleeder: { kind: 'resistor', label: 'Bleeder resistor', writes: [value('bleeder', 'resistance', 'resistance')] },
  bypassContactor: {
    kind: 'contactor',
    label: 'Bypass contactor',
    writes: [rating('contactorMakeCurrent', 'makeCurrent'), rating('contactorCarryCurrent', 'carryCurrent')],
  },
  fuse: { kind: 'fuse', label: 'Fuse', writes: [rating('fuseMeltingI2t', 'meltingI2t')] },
  diode: {
    kind: 'semiconductor',
    label: 'Diode',
    writes: [rating('diodeSurgeCurrent', 'surgeCurrent'), rating('diodeI2t', 'i2t')],
  },
  switch: { kind: 'semiconductor', label: 'Switch', writes: [rating('switchVoltage', 'blockingVoltage')] },
} as const satisfies Record<string, SlotInfo>;

export type PartSlot = keyof typeof PART_SLOTS;
export const PART_SLOT_KEYS = Object.keys(PART_SLOTS) as PartSlot[];

/** Which part slot fills each part in a design: slot → part id (or part number before it is stored). */
export type PartRefs = Partial<Record<PartSlot, string>>;

export interface AppliedPart {
  /** A new design file; the caller's is not changed. */
  design: DesignInput;
  partRefs: PartRefs;
  /** Design paths written from the part ("capacitor.capacitance", "ratings.capacitorVoltage"). */
  written: string[];
  /** Rating paths removed because the part does not give them. */
  cleared: string[];
}

/** The reference a design keeps for a part: its id once stored, its part number before. */
export function partReference(part: Part): string {
  return part.id ?? part.partNumber;
}

function pathOf(write: Write): string {
  return 'rating' in write.target ? `ratings.${write.target.rating}` : `${write.target.section}.${write.target.field}`;
}

/**
 * Writes `part` into `designInput` at `slot`. Throws DesignError (path "slot") when the slot takes
 * another kind of part. `partRefs` are the design's existing references; the result carries them
 * with this slot set.
 */
export function applyPartToDesign(designInput: DesignInput, slot: PartSlot, part: Part, partRefs: PartRefs = {}): AppliedPart {
  const info: SlotInfo | undefined = (PART_SLOTS as Record<string, SlotInfo>)[slot];
  if (!info) throw new DesignError([{ path: 'slot', message: `unknown part slot "${String(slot)}"` }]);
  if (part.kind !== info.kind) {
    throw new DesignError([
      { path: 'slot', message: `the ${info.label.toLowerCase()} takes ${KIND_LABELS[info.kind]}, not ${KIND_LABELS[part.kind]}` },
    ]);
  }
  const design = structuredClone(designInput) as DesignInput;
  const sections = design as unknown as Record<string, Record<string, unknown> | null | undefined>;
  const source = part as unknown as Record<string, number | undefined>;
  const written: string[] = [];
  const cleared: string[] = [];
  for (const write of info.writes) {
    const given = source[write.from];
    if ('rating' in write.target) {
      const key = write.target.rating;
      if (given !== undefined) {
        design.ratings = { ...(design.ratings ?? {}), [key]: given };
        written.push(pathOf(write));
      } else if (design.ratings && key in design.ratings) {
        const rest = { ...design.ratings };
        delete rest[key];
        design.ratings = rest;
        cleared.push(pathOf(write));
      }
    } else if (given !== undefined) {
      const { section, field } = write.target;
      sections[section] = { ...(sections[section] ?? {}), [field]: given };
      written.push(pathOf(write));
    }
  }
  return { design, partRefs: { ...partRefs, [slot]: partReference(part) }, written, cleared };
}

export interface RatingCitation {
  slot: PartSlot;
  partId: string;
  partNumber: string | null;
}

/**
 * For each rating key a referenced part provides: which slot and part it came from, for the checks
 * to cite. `parts` resolves references to part numbers; an unknown reference is cited by its id.
 */
export function ratingCitations(partRefs: PartRefs, parts: Part[] = []): Partial<Record<RatingKey, RatingCitation>> {
  const citations: Partial<Record<RatingKey, RatingCitation>> = {};
  for (const slot of PART_SLOT_KEYS) {
    const partId = partRefs[slot];
    if (!partId) continue;
    const part = parts.find((candidate) => partReference(candidate) === partId) ?? null;
    for (const write of (PART_SLOTS[slot] as SlotInfo).writes) {
      if (!('rating' in write.target)) continue;
      if (part && (part as unknown as Record<string, unknown>)[write.from] === undefined) continue;
      citations[write.target.rating] = { slot, partId, partNumber: part?.partNumber ?? null };
    }
  }
  return citations;
}
