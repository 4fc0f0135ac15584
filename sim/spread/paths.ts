/**
 * The design values a tolerance can be put on, named by their path in the design file
 * ("capacitor.capacitance"), with how to read and write each one on a parsed `Design`.
 *
 * Every component value and the source voltage is here, plus the few other numbers whose spread a
 * reviewer asks about: the switched current and the initial voltages, the bypass threshold and the
 * contactor delay.
 */
import type { Design } from '../design';
import type { Dimension } from '../units';

export const TOLERANCE_PATHS = [
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

export type TolerancePath = (typeof TOLERANCE_PATHS)[number];

/** Which values a sampled value must stay inside (the design schema's own bounds). */
export type ValueBound = 'any' | 'nonNegative' | 'positive' | 'unitInterval';

export interface TolerancePathInfo {
  label: string;
  /** 'load' when the dimension follows load.kind (Ω, A or W). */
  dimension: Dimension | 'load';
  bound: ValueBound;
  /** A capacitor's value or ESR: may carry an end-of-life drift. */
  drift: boolean;
  /** The design section that must be present for the value to exist. */
  section: 'source' | 'precharge' | 'precharge.bypass' | 'filter' | 'capacitor' | 'damping' | 'bleeder' | 'load' | 'initial';
  get: (design: Design) => number | null;
  /** Writes the value into a design that `cloneDesign` made (never into the caller's design). */
  set: (design: Design, value: number) => void;
}

export const PATH_INFO: Record<TolerancePath, TolerancePathInfo> = {
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

export function isTolerancePath(path: string): path is TolerancePath {
  return Object.prototype.hasOwnProperty.call(PATH_INFO, path);
}

/** The unit symbol a value at this path is shown in. */
export function unitOfPath(path: TolerancePath, design: Design): string {
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
export function cloneDesign(d: Design): Design {
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
