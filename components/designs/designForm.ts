// The editor's model of a design: the groups and fields it shows, and the small path helpers that
// read and write the working copy (the engine's design file: SI numbers or strings with units, so
// what an engineer typed is kept as typed).
import { RATING_KEYS, RATING_DIMENSIONS, type RatingKey } from '@/sim/design';
import { formatEng, type Dimension } from '@/sim/units';
import { readQuantity, UNIT_OF } from '@/components/ui/UnitField';
import { mainsSketchOf, type SketchParts } from './CircuitSketch';

export type Draft = Record<string, unknown>;

export interface FieldSpec {
  path: string;
  label: string;
  dimension: Dimension;
  optional?: boolean;
  emptyMeaning?: string;
  /** Shown only when this returns true for the draft (a bypass's time when it closes at a time). */
  when?: (draft: Draft) => boolean;
}

export type SectionKey =
  'source' | 'precharge' | 'filter' | 'capacitor' | 'damping' | 'bleeder' | 'load' | 'initial' | 'ratings' | 'run';

export interface GroupSpec {
  key: SectionKey;
  title: string;
  /** One line on what the group is. */
  blurb: string;
  /** The section may be left out of the circuit; the editor offers a switch. */
  removable?: boolean;
  fields: FieldSpec[];
}

const RATING_LABELS: Record<RatingKey, string> = {
  capacitorVoltage: 'Capacitor rated voltage',
  capacitorSurgeVoltage: 'Capacitor surge voltage',
  inductorSaturationCurrent: 'Inductor saturation current',
  prechargePulseEnergy: 'Precharge resistor pulse energy',
  prechargePeakPower: 'Precharge resistor peak power',
  prechargeContinuousPower: 'Precharge resistor continuous power',
  contactorMakeCurrent: 'Contactor making current',
  contactorCarryCurrent: 'Contactor carrying current',
  fuseMeltingI2t: 'Fuse melting I²t',
  diodeSurgeCurrent: 'Diode surge current (IFSM)',
  diodeI2t: 'Diode I²t',
  switchVoltage: 'Switch voltage rating',
  cableI2t: 'Cable I²t',
};

const bypassFitted = (d: Draft) => getIn(d, 'precharge.bypass') != null;
const closesAtTime = (d: Draft) => bypassFitted(d) && getIn(d, 'precharge.bypass.when') === 'time';
const closesAtVoltage = (d: Draft) => bypassFitted(d) && getIn(d, 'precharge.bypass.when') !== 'time';
const loadKind = (d: Draft) => (getIn(d, 'load.kind') as string | undefined) ?? 'none';

export const LOAD_DIMENSION: Record<string, Dimension> = { resistance: 'resistance', current: 'current', power: 'power' };

export const GROUPS: GroupSpec[] = [
  {
    key: 'source',
    title: 'Source',
    blurb: 'The supply that is switched on, with its own resistance and inductance.',
    fields: [
      { path: 'source.voltage', label: 'Source voltage', dimension: 'voltage' },
      { path: 'source.resistance', label: 'Source resistance', dimension: 'resistance', optional: true, emptyMeaning: '0 Ω' },
      {
        path: 'source.inductance',
        label: 'Source and wiring inductance',
        dimension: 'inductance',
        optional: true,
        emptyMeaning: '0 H',
      },
      { path: 'source.riseTime', label: 'Rise time', dimension: 'time', optional: true, emptyMeaning: 'a step' },
    ],
  },
  {
    key: 'precharge',
    title: 'Precharge and bypass',
    blurb: 'A series resistor that limits inrush, and the contactor that shorts it once the link is charged.',
    removable: true,
    fields: [
      { path: 'precharge.resistance', label: 'Precharge resistance', dimension: 'resistance' },
      {
        path: 'precharge.bypass.fraction',
        label: 'Close at fraction of Vs',
        dimension: 'ratio',
        optional: true,
        emptyMeaning: 'default 95 %',
        when: closesAtVoltage,
      },
      { path: 'precharge.bypass.time', label: 'Close at time', dimension: 'time', when: closesAtTime },
      {
        path: 'precharge.bypass.delay',
        label: 'Contactor delay',
        dimension: 'time',
        optional: true,
        emptyMeaning: '0 s',
        when: bypassFitted,
      },
    ],
  },
  {
    key: 'filter',
    title: 'Input filter',
    blurb: 'Series inductor between the source and the DC link.',
    removable: true,
    fields: [
      { path: 'filter.inductance', label: 'Filter inductance', dimension: 'inductance', optional: true, emptyMeaning: '0 H' },
      { path: 'filter.resistance', label: 'Filter resistance', dimension: 'resistance', optional: true, emptyMeaning: '0 Ω' },
    ],
  },
  {
    key: 'capacitor',
    title: 'DC link',
    blurb: 'The capacitor bank that is charged.',
    fields: [
      { path: 'capacitor.capacitance', label: 'Capacitance', dimension: 'capacitance' },
      { path: 'capacitor.esr', label: 'ESR', dimension: 'resistance', optional: true, emptyMeaning: '0 Ω' },
    ],
  },
  {
    key: 'damping',
    title: 'Damping branch',
    blurb: 'A resistor in series with a capacitor, across the DC link, to damp ringing.',
    removable: true,
    fields: [
      { path: 'damping.resistance', label: 'Damping resistance', dimension: 'resistance' },
      { path: 'damping.capacitance', label: 'Damping capacitance', dimension: 'capacitance' },
    ],
  },
  {
    key: 'bleeder',
    title: 'Bleeder',
    blurb: 'A resistor across the DC link that discharges it after the source is removed.',
    removable: true,
    fields: [{ path: 'bleeder.resistance', label: 'Bleeder resistance', dimension: 'resistance' }],
  },
  {
    key: 'load',
    title: 'Load',
    blurb: 'What the DC link feeds: a resistance, a constant current or a constant power.',
    removable: true,
    fields: [
      { path: 'load.value', label: 'Load', dimension: 'resistance', when: (d) => loadKind(d) !== 'none' },
      {
        path: 'load.start',
        label: 'Load starts at',
        dimension: 'time',
        optional: true,
        emptyMeaning: '0 s',
        when: (d) => loadKind(d) !== 'none',
      },
      {
        path: 'load.undervoltage',
        label: 'Load starts above',
        dimension: 'voltage',
        optional: true,
        emptyMeaning: 'half of Vs',
        when: (d) => loadKind(d) === 'power',
      },
    ],
  },
  {
    key: 'initial',
    title: 'Initial conditions',
    blurb: 'The state at switch-on; a charged bus for a hot-plug, a current for a turn-off.',
    removable: true,
    fields: [
      { path: 'initial.capacitorVoltage', label: 'Capacitor voltage', dimension: 'voltage', optional: true, emptyMeaning: '0 V' },
      { path: 'initial.inductorCurrent', label: 'Inductor current', dimension: 'current', optional: true, emptyMeaning: '0 A' },
      {
        path: 'initial.dampingVoltage',
        label: 'Damping capacitor voltage',
        dimension: 'voltage',
        optional: true,
        emptyMeaning: 'same as the DC link',
        when: (d) => getIn(d, 'damping') != null,
      },
    ],
  },
  {
    key: 'ratings',
    title: 'Ratings',
    blurb: 'Absolute ratings from the parts. Leave a rating empty and its check reads "not checked".',
    fields: RATING_KEYS.map((key) => ({
      path: `ratings.${key}`,
      label: RATING_LABELS[key],
      dimension: RATING_DIMENSIONS[key],
      optional: true,
      emptyMeaning: 'not checked',
    })),
  },
  {
    key: 'run',
    title: 'Run',
    blurb: 'How long to simulate after switch-on.',
    fields: [{ path: 'duration', label: 'Duration', dimension: 'time' }],
  },
];

/** The dimension of a field in this draft (a load's value depends on its kind). */
export function dimensionOf(field: FieldSpec, draft: Draft): Dimension {
  if (field.path === 'load.value') return LOAD_DIMENSION[loadKind(draft)] ?? 'resistance';
  return field.dimension;
}

/** Fresh values for a part switched on, plausible for Northfold's 800 V depot charger. */
export const SECTION_DEFAULTS: Partial<Record<SectionKey, Draft>> = {
  precharge: { resistance: '47 Ω', bypass: { when: 'voltage', fraction: 0.95, delay: '20 ms' } },
  filter: { inductance: '10 µH', resistance: '10 mΩ' },
  damping: { resistance: '1 Ω', capacitance: '100 µF' },
  bleeder: { resistance: '10 kΩ' },
  load: { kind: 'resistance', value: '100 Ω' },
  initial: { capacitorVoltage: '0 V' },
};

export function getIn(obj: unknown, path: string): unknown {
  let cur: unknown = obj;
  for (const key of path.split('.')) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<string, unknown>)[key];
  }
  return cur;
}

/** Returns a copy with the value at path replaced; undefined removes the key. */
export function setIn(obj: Draft, path: string, value: unknown): Draft {
  const [head, ...rest] = path.split('.');
  const copy: Draft = { ...obj };
  if (rest.length === 0) {
    if (value === undefined) delete copy[head];
    else copy[head] = value;
    return copy;
  }
  const child = copy[head];
  copy[head] = setIn(child && typeof child === 'object' ? (child as Draft) : {}, rest.join('.'), value);
  return copy;
}

/** How a stored value reads in a field: a number in engineering notation, a string as typed. */
export function fieldText(value: unknown, dimension: Dimension): string {
  if (value === undefined || value === null) return '';
  if (typeof value === 'string') return value;
  if (typeof value === 'number') {
    if (dimension === 'ratio') return `${Number((value * 100).toPrecision(6))} %`;
    return formatEng(value, UNIT_OF[dimension], 6);
  }
  return String(value);
}

function quantityOf(draft: Draft, path: string, dimension: Dimension): number | null {
  const raw = getIn(draft, path);
  if (typeof raw === 'number') return raw;
  if (typeof raw !== 'string') return null;
  const parsed = readQuantity(raw, dimension);
  return parsed.ok === true ? parsed.value : null;
}

/** The parts the sketch draws, read from the draft as it is (even half-edited). */
export function sketchParts(draft: Draft): SketchParts {
  const kind = loadKind(draft);
  const present = (k: string) => getIn(draft, k) != null;
  const rs = quantityOf(draft, 'source.resistance', 'resistance') ?? 0;
  const ls = quantityOf(draft, 'source.inductance', 'inductance') ?? 0;
  return {
    mains: mainsSketchOf(draft),
    sourceVoltage: quantityOf(draft, 'source.voltage', 'voltage'),
    sourceImpedance: rs > 0 || ls > 0,
    precharge: present('precharge')
      ? { resistance: quantityOf(draft, 'precharge.resistance', 'resistance'), bypass: present('precharge.bypass') }
      : null,
    filter: present('filter') ? { inductance: quantityOf(draft, 'filter.inductance', 'inductance') } : null,
    capacitance: quantityOf(draft, 'capacitor.capacitance', 'capacitance'),
    damping: present('damping'),
    bleeder: present('bleeder') ? { resistance: quantityOf(draft, 'bleeder.resistance', 'resistance') } : null,
    load:
      present('load') && kind !== 'none'
        ? { kind: kind as 'resistance' | 'current' | 'power', value: quantityOf(draft, 'load.value', LOAD_DIMENSION[kind]) }
        : null,
  };
}
