/**
 * The design values a tolerance can be put on, named by their path in the design file
 * ("capacitor.capacitance"), with how to read and write each one on a parsed `Design` or, for the
 * `mains.` paths, a parsed `MainsDesign` (sim/mains).
 *
 * Every component value and the source voltage is here, plus the few other numbers whose spread a
 * reviewer asks about: the switched current and the initial voltages, the bypass threshold and the
 * contactor delay. A mains design has no DC source, precharge resistor or filter: its source-side
 * values are the `mains.` paths (line voltage and frequency, line impedance, diodes, limiter), and
 * its downstream values (capacitor, damping, bleeder, load, initial voltage) are the DC paths.
 */
import type { Design } from '../design';
import type { MainsDesign } from '../mains/schema';
import type { Dimension } from '../units';

/** A parsed design of either kind the spread runs. */
export type SpreadDesign = Design | MainsDesign;

/** A mains design (sim/mains) is one with a `mains` section. */
export function isMainsSpreadDesign(design: SpreadDesign): design is MainsDesign {
  return (design as Partial<MainsDesign>).mains !== undefined;
}

/** The paths of a DC design (the engine's `Design`). */
export const DC_TOLERANCE_PATHS = [
  'source.voltage',
  'source.resistance',
  'source.inductance',
  'source.riseTime',
  'precharge.resistance',
  'precharge.bypass.fraction',
  'precharge.bypass.delay',
  'filter.inductance',
  'filter.resistance',
  'capacitor.capacitance',
  'capacitor.esr',
  'damping.resistance',
  'damping.capacitance',
  'bleeder.resistance',
  'load.value',
  'initial.capacitorVoltage',
  'initial.inductorCurrent',
] as const;

/** The paths only a mains design has. */
export const MAINS_ONLY_PATHS = [
  'mains.voltage',
  'mains.frequency',
  'mains.lineResistance',
  'mains.lineInductance',
  'mains.diode.forwardVoltage',
  'mains.diode.slopeResistance',
  'mains.limiter.resistance',
  'mains.limiter.r25',
  'mains.limiter.beta',
  'mains.limiter.startTemperature',
  'mains.limiter.bypass.delay',
] as const;

/** The DC paths that a mains design shares (its downstream sections are the engine's own). */
export const MAINS_SHARED_PATHS = [
  'capacitor.capacitance',
  'capacitor.esr',
  'damping.resistance',
  'damping.capacitance',
  'bleeder.resistance',
  'load.value',
  'initial.capacitorVoltage',
] as const;

/** Every path, in the canonical (sampling) order: the DC paths first, as they always were, then the mains ones. */
export const TOLERANCE_PATHS = [...DC_TOLERANCE_PATHS, ...MAINS_ONLY_PATHS] as const;

export type DcTolerancePath = (typeof DC_TOLERANCE_PATHS)[number];
export type MainsOnlyPath = (typeof MAINS_ONLY_PATHS)[number];
export type TolerancePath = (typeof TOLERANCE_PATHS)[number];

/** The paths a design of this kind can carry, in canonical order. */
export function tolerancePathsFor(design: SpreadDesign): readonly TolerancePath[] {
  return isMainsSpreadDesign(design) ? [...MAINS_SHARED_PATHS, ...MAINS_ONLY_PATHS] : DC_TOLERANCE_PATHS;
}

/** Whether the path applies to a design of this kind (mains paths to mains designs, and so on). */
export function pathAppliesTo(path: TolerancePath, design: SpreadDesign): boolean {
  return (tolerancePathsFor(design) as readonly string[]).includes(path);
}

/** Which values a sampled value must stay inside (the design schema's own bounds). */
export type ValueBound = 'any' | 'nonNegative' | 'positive' | 'unitInterval' | 'temperature';

export interface TolerancePathInfo<D = Design> {
  label: string;
  /** 'load' when the dimension follows load.kind (Ω, A or W). */
  dimension: Dimension | 'load';
  bound: ValueBound;
  /** A capacitor's value or ESR: may carry an end-of-life drift. */
  drift: boolean;
  /** The design section that must be present for the value to exist. */
  section:
    | 'source'
    | 'precharge'
    | 'precharge.bypass'
    | 'filter'
    | 'capacitor'
    | 'damping'
    | 'bleeder'
    | 'load'
    | 'initial'
    | 'mains'
    | 'mains.limiter.resistor'
    | 'mains.limiter.ntc'
    | 'mains.limiter.bypass';
  get: (design: D) => number | null;
  /** Writes the value into a design that `cloneDesign` made (never into the caller's design). */
  set: (design: D, value: number) => void;
}

const DC_PATH_INFO: Record<DcTolerancePath, TolerancePathInfo> = {
  'source.voltage': {
    label: 'Source voltage',
    dimension: 'voltage',
    bound: 'any',
    drift: false,
    section: 'source',
    get: (d) => d.source.voltage,
    set: (d, v) => void (d.source.voltage = v),
  },
  'source.resistance': {
    label: 'Source resistance',
    dimension: 'resistance',
    bound: 'nonNegative',
    drift: false,
    section: 'source',
    get: (d) => d.source.resistance,
    set: (d, v) => void (d.source.resistance = v),
  },
  'source.inductance': {
    label: 'Source inductance',
    dimension: 'inductance',
    bound: 'nonNegative',
    drift: false,
    section: 'source',
    get: (d) => d.source.inductance,
    set: (d, v) => void (d.source.inductance = v),
  },
  'source.riseTime': {
    label: 'Source rise time',
    dimension: 'time',
    bound: 'nonNegative',
    drift: false,
    section: 'source',
    get: (d) => d.source.riseTime,
    set: (d, v) => void (d.source.riseTime = v),
  },
  'precharge.resistance': {
    label: 'Precharge resistance',
    dimension: 'resistance',
    bound: 'positive',
    drift: false,
    section: 'precharge',
    get: (d) => d.precharge?.resistance ?? null,
    set: (d, v) => void (d.precharge!.resistance = v),
  },
  'precharge.bypass.fraction': {
    label: 'Bypass threshold',
    dimension: 'ratio',
    bound: 'unitInterval',
    drift: false,
    section: 'precharge.bypass',
    get: (d) => d.precharge?.bypass?.fraction ?? null,
    set: (d, v) => void (d.precharge!.bypass!.fraction = v),
  },
  'precharge.bypass.delay': {
    label: 'Contactor delay',
    dimension: 'time',
    bound: 'nonNegative',
    drift: false,
    section: 'precharge.bypass',
    get: (d) => d.precharge?.bypass?.delay ?? null,
    set: (d, v) => void (d.precharge!.bypass!.delay = v),
  },
  'filter.inductance': {
    label: 'Filter inductance',
    dimension: 'inductance',
    bound: 'nonNegative',
    drift: false,
    section: 'filter',
    get: (d) => d.filter?.inductance ?? null,
    set: (d, v) => void (d.filter!.inductance = v),
  },
  'filter.resistance': {
    label: 'Filter resistance',
    dimension: 'resistance',
    bound: 'nonNegative',
    drift: false,
    section: 'filter',
    get: (d) => d.filter?.resistance ?? null,
    set: (d, v) => void (d.filter!.resistance = v),
  },
  'capacitor.capacitance': {
    label: 'Capacitance',
    dimension: 'capacitance',
    bound: 'positive',
    drift: true,
    section: 'capacitor',
    get: (d) => d.capacitor.capacitance,
    set: (d, v) => void (d.capacitor.capacitance = v),
  },
  'capacitor.esr': {
    label: 'Capacitor ESR',
    dimension: 'resistance',
    bound: 'nonNegative',
    drift: true,
    section: 'capacitor',
    get: (d) => d.capacitor.esr,
    set: (d, v) => void (d.capacitor.esr = v),
  },
  'damping.resistance': {
    label: 'Damping resistance',
    dimension: 'resistance',
    bound: 'positive',
    drift: false,
    section: 'damping',
    get: (d) => d.damping?.resistance ?? null,
    set: (d, v) => void (d.damping!.resistance = v),
  },
  'damping.capacitance': {
    label: 'Damping capacitance',
    dimension: 'capacitance',
    bound: 'positive',
    drift: true,
    section: 'damping',
    get: (d) => d.damping?.capacitance ?? null,
    set: (d, v) => void (d.damping!.capacitance = v),
  },
  'bleeder.resistance': {
    label: 'Bleeder resistance',
    dimension: 'resistance',
    bound: 'positive',
    drift: false,
    section: 'bleeder',
    get: (d) => d.bleeder?.resistance ?? null,
    set: (d, v) => void (d.bleeder!.resistance = v),
  },
  'load.value': {
    label: 'Load',
    dimension: 'load',
    bound: 'nonNegative',
    drift: false,
    section: 'load',
    get: (d) => d.load?.value ?? null,
    set: (d, v) => void (d.load!.value = v),
  },
  'initial.capacitorVoltage': {
    label: 'Initial capacitor voltage',
    dimension: 'voltage',
    bound: 'any',
    drift: false,
    section: 'initial',
    get: (d) => d.initial.capacitorVoltage,
    set: (d, v) => {
      // A damping capacitor that sat at the main capacitor's voltage (the default) stays with it: in
      // a settled circuit both are charged to the same voltage.
      if (d.initial.dampingVoltage === d.initial.capacitorVoltage) d.initial.dampingVoltage = v;
      d.initial.capacitorVoltage = v;
    },
  },
  'initial.inductorCurrent': {
    label: 'Initial current',
    dimension: 'current',
    bound: 'any',
    drift: false,
    section: 'initial',
    get: (d) => d.initial.inductorCurrent,
    set: (d, v) => void (d.initial.inductorCurrent = v),
  },
};


type Ntc = Extract<MainsDesign['mains']['limiter'], { kind: 'ntc' }>;
const ntcOf = (d: MainsDesign): Ntc | null => (d.mains.limiter.kind === 'ntc' ? d.mains.limiter : null);
const limiterBypassOf = (d: MainsDesign) => (d.mains.limiter.kind === 'none' ? null : d.mains.limiter.bypass);

const MAINS_PATH_INFO: Record<MainsOnlyPath, TolerancePathInfo<MainsDesign>> = {
  'mains.voltage': {
    label: 'Mains voltage (RMS)',
    dimension: 'voltage',
    bound: 'positive',
    drift: false,
    section: 'mains',
    get: (d) => d.mains.voltage,
    set: (d, v) => void (d.mains.voltage = v),
  },
  'mains.frequency': {
    label: 'Mains frequency',
    dimension: 'frequency',
    bound: 'positive',
    drift: false,
    section: 'mains',
    get: (d) => d.mains.frequency,
    // The IFSM test pulse (diode.surgePulseDuration) is the diode's rating: it stays as parsed.
    set: (d, v) => void (d.mains.frequency = v),
  },
  'mains.lineResistance': {
    label: 'Line resistance',
    dimension: 'resistance',
    bound: 'nonNegative',
    drift: false,
    section: 'mains',
    get: (d) => d.mains.lineResistance,
    set: (d, v) => void (d.mains.lineResistance = v),
  },
  'mains.lineInductance': {
    label: 'Line inductance',
    dimension: 'inductance',
    bound: 'nonNegative',
    drift: false,
    section: 'mains',
    get: (d) => d.mains.lineInductance,
    set: (d, v) => void (d.mains.lineInductance = v),
  },
  'mains.diode.forwardVoltage': {
    label: 'Diode forward voltage',
    dimension: 'voltage',
    bound: 'nonNegative',
    drift: false,
    section: 'mains',
    get: (d) => d.mains.diode.forwardVoltage,
    set: (d, v) => void (d.mains.diode.forwardVoltage = v),
  },
  'mains.diode.slopeResistance': {
    label: 'Diode slope resistance',
    dimension: 'resistance',
    bound: 'nonNegative',
    drift: false,
    section: 'mains',
    get: (d) => d.mains.diode.slopeResistance,
    set: (d, v) => void (d.mains.diode.slopeResistance = v),
  },
  'mains.limiter.resistance': {
    label: 'Limiter resistance',
    dimension: 'resistance',
    bound: 'positive',
    drift: false,
    section: 'mains.limiter.resistor',
    get: (d) => (d.mains.limiter.kind === 'resistor' ? d.mains.limiter.resistance : null),
    set: (d, v) => {
      if (d.mains.limiter.kind === 'resistor') d.mains.limiter.resistance = v;
    },
  },
  'mains.limiter.r25': {
    label: 'NTC resistance at 25 °C',
    dimension: 'resistance',
    bound: 'positive',
    drift: false,
    section: 'mains.limiter.ntc',
    get: (d) => ntcOf(d)?.r25 ?? null,
    set: (d, v) => {
      const ntc = ntcOf(d);
      if (ntc) ntc.r25 = v;
    },
  },
  'mains.limiter.beta': {
    label: 'NTC β',
    dimension: 'temperature',
    bound: 'positive',
    drift: false,
    section: 'mains.limiter.ntc',
    get: (d) => ntcOf(d)?.beta ?? null,
    set: (d, v) => {
      const ntc = ntcOf(d);
      if (ntc) ntc.beta = v;
    },
  },
  'mains.limiter.startTemperature': {
    label: 'NTC start temperature',
    dimension: 'temperature',
    bound: 'temperature',
    drift: false,
    section: 'mains.limiter.ntc',
    get: (d) => ntcOf(d)?.startTemperature ?? null,
    set: (d, v) => {
      const ntc = ntcOf(d);
      if (ntc) ntc.startTemperature = v;
    },
  },
  'mains.limiter.bypass.delay': {
    label: 'Relay delay',
    dimension: 'time',
    bound: 'nonNegative',
    drift: false,
    section: 'mains.limiter.bypass',
    get: (d) => limiterBypassOf(d)?.delay ?? null,
    set: (d, v) => {
      const bypass = limiterBypassOf(d);
      if (bypass) bypass.delay = v;
    },
  },
};

/**
 * How to read and write each path. The DC entries are typed on `Design`; the shared downstream
 * ones read the same sections of a `MainsDesign` (the mains schema takes them from the engine's).
 */
export const PATH_INFO: Record<TolerancePath, TolerancePathInfo<any>> = { ...DC_PATH_INFO, ...MAINS_PATH_INFO };

export function isTolerancePath(path: string): path is TolerancePath {
  return Object.prototype.hasOwnProperty.call(PATH_INFO, path);
}

/** The unit symbol a value at this path is shown in. */
export function unitOfPath(path: TolerancePath, design: SpreadDesign): string {
  const info = PATH_INFO[path];
  if (info.dimension === 'load') {
    const kind = design.load?.kind;
    return kind === 'resistance' ? 'Ω' : kind === 'current' ? 'A' : 'W';
  }
  return UNIT_SYMBOLS[info.dimension];
}

export const UNIT_SYMBOLS: Record<Dimension, string> = {
  voltage: 'V',
  current: 'A',
  resistance: 'Ω',
  inductance: 'H',
  capacitance: 'F',
  time: 's',
  power: 'W',
  energy: 'J',
  i2t: 'A²s',
  frequency: 'Hz',
  charge: 'C',
  temperature: 'K',
  ratio: '',
};

/** A deep copy of a parsed design (its parts are plain objects of numbers), cheap enough per sample. */
export function cloneDesign<D extends SpreadDesign>(d: D): D {
  if (isMainsSpreadDesign(d)) return cloneMainsDesign(d) as D;
  return cloneDcDesign(d as Design) as D;
}

function cloneDcDesign(d: Design): Design {
  return {
    ...d,
    source: { ...d.source },
    precharge: d.precharge ? { ...d.precharge, bypass: d.precharge.bypass ? { ...d.precharge.bypass } : null } : null,
    filter: d.filter ? { ...d.filter } : null,
    capacitor: { ...d.capacitor },
    damping: d.damping ? { ...d.damping } : null,
    bleeder: d.bleeder ? { ...d.bleeder } : null,
    load: d.load ? { ...d.load } : null,
    initial: { ...d.initial },
    ratings: { ...d.ratings },
    derating: { ...d.derating },
  };
}

function cloneMainsDesign(d: MainsDesign): MainsDesign {
  const limiter = d.mains.limiter;
  return {
    ...d,
    mains: {
      ...d.mains,
      diode: { ...d.mains.diode },
      limiter:
        limiter.kind === 'none'
          ? { kind: 'none' }
          : limiter.kind === 'resistor'
            ? { ...limiter, bypass: limiter.bypass ? { ...limiter.bypass } : null }
            : {
                ...limiter,
                thermal: limiter.thermal ? { ...limiter.thermal } : null,
                bypass: limiter.bypass ? { ...limiter.bypass } : null,
              },
    },
    capacitor: { ...d.capacitor },
    damping: d.damping ? { ...d.damping } : null,
    bleeder: d.bleeder ? { ...d.bleeder } : null,
    load: d.load ? { ...d.load } : null,
    initial: { ...d.initial },
    ratings: { ...d.ratings },
    derating: { ...d.derating },
  };
}
