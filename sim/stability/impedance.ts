/**
 * The filter's output impedance Zout(jω), seen from the load terminals with the source shorted and
 * the load removed: the series branch R + jωL in parallel with the capacitor (ESR + 1/jωC), the
 * damping branch (Rd + 1/jωCd) and the bleeder Rb. Its peak against the load's |Zin| = V²/P is
 * Middlebrook's criterion (R. D. Middlebrook, "Input filter considerations in design and
 * application of switching regulators", IEEE IAS Annual Meeting, 1976).
 */
import { finalSeriesResistance, type Design } from '../design';

export interface Complex {
  re: number;
  im: number;
}

/** The branch values the impedance needs, in SI. */
export interface FilterBranches {
  seriesResistance: number;
  inductance: number;
  capacitance: number;
  esr: number;
  damping: { resistance: number; capacitance: number } | null;
  bleederResistance: number | null;
}

export function filterBranches(design: Design): FilterBranches {
  return {
    seriesResistance: finalSeriesResistance(design),
    inductance: design.source.inductance + (design.filter?.inductance ?? 0),
    capacitance: design.capacitor.capacitance,
    esr: design.capacitor.esr,
    damping: design.damping,
    bleederResistance: design.bleeder?.resistance ?? null,
  };
}

/** 1/(a + jb) */
function inverse(re: number, im: number): Complex {
  const d = re * re + im * im;
  return { re: re / d, im: -im / d };
}

/** Zout(jω) at ω = 2πf. */
export function outputImpedance(branches: FilterBranches, frequency: number): Complex {
  const w = 2 * Math.PI * frequency;
  let yRe = 0;
  let yIm = 0;
  const addImpedance = (re: number, im: number) => {
    if (re === 0 && im === 0) {
      yRe = Infinity; // a short across the terminals
      return;
    }
    const y = inverse(re, im);
    yRe += y.re;
    yIm += y.im;
  };
  addImpedance(branches.seriesResistance, w * branches.inductance);
  addImpedance(branches.esr, -1 / (w * branches.capacitance));
  if (branches.damping) addImpedance(branches.damping.resistance, -1 / (w * branches.damping.capacitance));
  if (branches.bleederResistance !== null) addImpedance(branches.bleederResistance, 0);
  if (!Number.isFinite(yRe)) return { re: 0, im: 0 };
  if (yRe === 0 && yIm === 0) return { re: Infinity, im: 0 };
  return inverse(yRe, yIm);
}

export function magnitude(z: Complex): number {
  return Math.hypot(z.re, z.im);
}

/** Log-spaced frequencies from fMin to fMax inclusive, `perDecade` per decade. */
export function logSweep(fMin: number, fMax: number, perDecade: number): number[] {
  const decades = Math.log10(fMax / fMin);
  const count = Math.max(2, Math.round(decades * perDecade) + 1);
  const step = decades / (count - 1);
  return Array.from({ length: count }, (_, k) => (k === count - 1 ? fMax : fMin * 10 ** (k * step)));
}

const GOLDEN = (Math.sqrt(5) - 1) / 2;

/**
 * The maximum of |Zout| between two frequencies that bracket it (a unimodal stretch), by golden-
 * section search in log f (J. Kiefer, "Sequential minimax search for a maximum", Proc. AMS 4
 * (1953) 502–506), to a relative frequency tolerance `tol`.
 */
export function refinePeak(branches: FilterBranches, fLo: number, fHi: number, tol = 1e-10): { f: number; zout: number } {
  const g = (x: number) => magnitude(outputImpedance(branches, Math.exp(x)));
  let a = Math.log(fLo);
  let b = Math.log(fHi);
  let c = b - GOLDEN * (b - a);
  let d = a + GOLDEN * (b - a);
  let gc = g(c);
  let gd = g(d);
  for (let k = 0; k < 200 && b - a > tol; k++) {
    if (gc > gd) {
      b = d;
      d = c;
      gd = gc;
      c = b - GOLDEN * (b - a);
      gc = g(c);
    } else {
      a = c;
      c = d;
      gc = gd;
      d = a + GOLDEN * (b - a);
      gd = g(d);
    }
  }
  const x = gc > gd ? c : d;
  return { f: Math.exp(x), zout: Math.max(gc, gd) };
}
