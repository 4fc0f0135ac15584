// What the checks need to know about a design's circuit, read once from the engine's `Design`.
import type { Design } from '../design';

/** Total capacitance on the DC link: the capacitor plus an RC damping branch's capacitor, F. */
export function linkCapacitance(design: Design): number {
  return design.capacitor.capacitance + (design.damping?.capacitance ?? 0);
}

/**
 * Current drawn from the DC link at capacitor voltage v: the load plus the bleeder. A constant-power
 * load draws P/v above its undervoltage threshold and nothing below it (as the engine models it).
 */
export function linkCurrentAt(design: Design, v: number): number {
  let current = design.bleeder ? v / design.bleeder.resistance : 0;
  const load = design.load;
  if (load) {
    if (load.kind === 'resistance') current += v / load.value;
    else if (load.kind === 'current') current += load.value;
    else if (v > load.undervoltage && v > 0) current += load.value / v;
  }
  return current;
}

/**
 * Resistance left across the DC link when the source is removed: the bleeder, and a resistive load
 * when `loadStaysConnected`. Infinity when nothing discharges it.
 */
export function dischargeResistance(design: Design, loadStaysConnected: boolean): number {
  const paths: number[] = [];
  if (design.bleeder) paths.push(design.bleeder.resistance);
  if (loadStaysConnected && design.load?.kind === 'resistance') paths.push(design.load.value);
  if (paths.length === 0) return Infinity;
  return 1 / paths.reduce((sum, r) => sum + 1 / r, 0);
}
