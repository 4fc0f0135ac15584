/**
 * When the configuration changes: the end of the source's rise, the load's connection, the bypass
 * closing. Each configuration holds on a half-open interval [t, next): at an event time the new
 * configuration applies. The voltage-triggered bypass time is found during the run and passed in.
 */
import type { Circuit, Configuration } from './circuit';

export function configurationAt(circuit: Circuit, t: number, bypassTime: number | null): Configuration {
  return {
    bypassClosed: circuit.prechargeResistance === null || (bypassTime !== null && t >= bypassTime),
    loadConnected: circuit.load !== null && t >= circuit.load.start,
    ramping: circuit.riseTime > 0 && t < circuit.riseTime,
  };
}

/** The first event time after t, or the end of the run. */
export function nextEventAfter(circuit: Circuit, t: number, bypassTime: number | null): number {
  let next = circuit.duration;
  const consider = (time: number | null | undefined) => {
    if (time !== null && time !== undefined && time > t && time < next) next = time;
  };
  if (circuit.riseTime > 0) consider(circuit.riseTime);
  if (circuit.load) consider(circuit.load.start);
  if (circuit.prechargeResistance !== null) consider(bypassTime);
  return next;
}

/** A bypass that closes at a fixed time; voltage-triggered ones are found during the run. */
export function fixedBypassTime(circuit: Circuit): number | null {
  if (circuit.prechargeResistance === null || !circuit.bypass || circuit.bypass.when !== 'time') return null;
  return circuit.bypass.time;
}

export function configurationKey(config: Configuration): string {
  return `${config.bypassClosed ? 1 : 0}${config.loadConnected ? 1 : 0}${config.ramping ? 1 : 0}`;
}
