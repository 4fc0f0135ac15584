/**
 * The design values a fit may adjust, named by their path in the design file, with how to read and
 * write each on a parsed `Design`. All are positive quantities, so the fit works on their logarithms
 * (a step is a ratio, and no value can cross zero).
 */
import type { Design } from '../design';
import { FitError } from './errors';

export const FIT_PARAMS = [
  'source.inductance',
  'source.resistance',
  'source.voltage',
  'filter.inductance',
  'filter.resistance',
  'capacitor.capacitance',
  'capacitor.esr',
  'precharge.resistance',
  'damping.resistance',
  'damping.capacitance',
] as const;

export type FitParam = (typeof FIT_PARAMS)[number];

interface ParamInfo {
  get: (design: Design) => number | null;
  /** Writes into a copy made by `withValues` (never into the caller's design). */
  set: (design: Design, value: number) => void;
  /** Series inductance or resistance of the ring loop, for sharing out the log-decrement estimate. */
  series: 'inductance' | 'resistance' | null;
}

export const FIT_PARAM_INFO: Record<FitParam, ParamInfo> = {
  'source.inductance': { get: (d) => d.source.inductance, set: (d, v) => void (d.source.inductance = v), series: 'inductance' },
  'source.resistance': { get: (d) => d.source.resistance, set: (d, v) => void (d.source.resistance = v), series: 'resistance' },
  'source.voltage': { get: (d) => d.source.voltage, set: (d, v) => void (d.source.voltage = v), series: null },
  'filter.inductance': {
    get: (d) => d.filter?.inductance ?? 0,
    set: (d, v) => void (d.filter = { inductance: v, resistance: d.filter?.resistance ?? 0 }),
    series: 'inductance',
  },
  'filter.resistance': {
    get: (d) => d.filter?.resistance ?? 0,
    set: (d, v) => void (d.filter = { inductance: d.filter?.inductance ?? 0, resistance: v }),
    series: 'resistance',
  },
  'capacitor.capacitance': {
    get: (d) => d.capacitor.capacitance,
    set: (d, v) => void (d.capacitor.capacitance = v),
    series: null,
  },
  'capacitor.esr': { get: (d) => d.capacitor.esr, set: (d, v) => void (d.capacitor.esr = v), series: 'resistance' },
  'precharge.resistance': {
    get: (d) => d.precharge?.resistance ?? null,
    set: (d, v) => void (d.precharge = d.precharge ? { ...d.precharge, resistance: v } : null),
    series: null,
  },
  'damping.resistance': {
    get: (d) => d.damping?.resistance ?? null,
    set: (d, v) => void (d.damping = d.damping ? { ...d.damping, resistance: v } : null),
    series: null,
  },
  'damping.capacitance': {
    get: (d) => d.damping?.capacitance ?? null,
    set: (d, v) => void (d.damping = d.damping ? { ...d.damping, capacitance: v } : null),
    series: null,
  },
};

/** Checks the list: known, no repeats, and the section present where the value needs one. */
export function checkParams(params: readonly string[], design: Design): FitParam[] {
  if (params.length === 0) throw new FitError('bad-parameter', 'choose at least one value to fit', 'params');
  const seen = new Set<string>();
  params.forEach((param, k) => {
    if (!(FIT_PARAMS as readonly string[]).includes(param)) {
      throw new FitError('bad-parameter', `"${param}" cannot be fitted; choose from ${FIT_PARAMS.join(', ')}`, `params.${k}`);
    }
    if (seen.has(param)) throw new FitError('bad-parameter', `"${param}" is listed twice`, `params.${k}`);
    seen.add(param);
    if (FIT_PARAM_INFO[param as FitParam].get(design) === null) {
      throw new FitError('bad-parameter', `the design has no ${param.split('.')[0]} section to fit "${param}" in`, `params.${k}`);
    }
  });
  return params as FitParam[];
}

/** A copy of the design with the given values written in. */
export function withValues(design: Design, values: Partial<Record<FitParam, number>>): Design {
  const copy: Design = {
    ...design,
    source: { ...design.source },
    capacitor: { ...design.capacitor },
    filter: design.filter ? { ...design.filter } : null,
    precharge: design.precharge ? { ...design.precharge } : null,
    damping: design.damping ? { ...design.damping } : null,
  };
  for (const [param, value] of Object.entries(values) as [FitParam, number][]) FIT_PARAM_INFO[param].set(copy, value);
  return copy;
}
