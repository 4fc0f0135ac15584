// Number wording shared by the checks, the discharge check and the notices.
import { formatEng as engineFormatEng } from '../units';

/**
 * The engine's engineering notation, except that a large I²t reads in kA²s ("20 kA²s", as the trade
 * and the design files write it) instead of "20000 A²s"; small ones stay plain, as the engine
 * writes them.
 */
export function formatEng(value: number, unit: string, digits = 3): string {
  if (unit === 'A²s' && Number.isFinite(value) && Math.abs(value) >= 1e4) {
    return Math.abs(value) >= 1e7 ? engineFormatEng(value / 1e6, 'MA²s', digits) : engineFormatEng(value / 1e3, 'kA²s', digits);
  }
  return engineFormatEng(value, unit, digits);
}

/** "36 %", "5.6 %", "5 %", "0.4 %": whole percent from 10 up, at most one decimal below. */
export function formatPercent(percent: number): string {
  const magnitude = Math.abs(percent);
  const text =
    magnitude >= 10 ? magnitude.toFixed(0) : magnitude >= 0.05 ? String(Number(magnitude.toFixed(1))) : magnitude.toPrecision(1);
  return `${text} %`;
}

/** "0.8" → "× 0.8" as written in a check's basis. */
export function formatFactor(factor: number): string {
  return `× ${Number(factor.toPrecision(3))}`;
}
