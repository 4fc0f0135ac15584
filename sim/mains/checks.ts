/**
 * The ratings checks for a mains design: the engine's `evaluateChecks` (sim/ratings) on the
 * engine design that stands for the rectifier's DC side (`engineDesignOf`), with the checks whose
 * metric differs for a rectifier fed from the mains recomputed from the mains metrics through the
 * engine's own `ratingCheck` (same status rules, margins and wording):
 *
 *  - diode-surge-current: the half-sine-equivalent surge current of the worst single diode pulse
 *    (same I²t over the IFSM test half-sine, metrics.ts) against IFSM; evaluateChecks would compare
 *    the peak line current;
 *  - diode-i2t: the worst diode's own I²t (each diode carries only its pair's pulses) against the
 *    diode's I²t rating; evaluateChecks would take the whole line's;
 *  - precharge-continuous-power: the limiter's average power over the last mains cycle of the run
 *    (it stays in circuit without a relay); evaluateChecks would use the DC load current, which
 *    understates the pulsed current a capacitor-input rectifier draws;
 *  - contactor-carry-current: the line's RMS current over the last cycle (the relay, or the switch
 *    that connects the mains, carries the line current);
 *  - the limiter's pulse energy and peak power and the fuse's I²t: the same metrics as the engine
 *    reads, in the limiter's words instead of the precharge resistor's.
 * Everything else (capacitor voltage and surge, cable I²t from the line's I²t, make current,
 * discharge) is read as the engine reads it.
 */
import type { Design } from '../design';
import { evaluateChecks } from '../ratings/checks';
import { ratingCheck, type RatingCheckSpec } from '../ratings/checks';
import { formatEng } from '../ratings/format';
import { resolvePolicy, type DeratingPolicy } from '../ratings/policy';
import type { Check } from '../ratings/status';
import { limiterResistanceAtStart, loopImpedance, sourcePeak, type MainsDesign } from './schema';
import type { MainsResult } from './simulate';

/**
 * The engine design that stands for the mains design's DC side, for the checks and the notices:
 * the source is the DC level the bridge charges the capacitor to (√2·V − 2·Vf) behind the loop's
 * resistance and inductance, and the limiter is the precharge resistor (at its start resistance),
 * bypassed at the relay's delay when there is a relay.
 */
export function engineDesignOf(design: MainsDesign): Design {
  const mains = design.mains;
  const loop = loopImpedance(mains, 0);
  const limiter = mains.limiter;
  return {
    name: design.name,
    notes: design.notes,
    source: {
      voltage: sourcePeak(mains) - 2 * mains.diode.forwardVoltage,
      resistance: loop.resistance,
      inductance: loop.inductance,
      riseTime: 0,
    },
    precharge:
      limiter.kind === 'none'
        ? null
        : {
            resistance: limiterResistanceAtStart(limiter),
            bypass: limiter.bypass ? { when: 'time', fraction: 0.95, time: limiter.bypass.delay, delay: 0 } : null,
          },
    filter: null,
    capacitor: design.capacitor,
    damping: design.damping,
    bleeder: design.bleeder,
    load: design.load,
    initial: design.initial,
    duration: design.duration,
    points: design.points,
    settleFraction: 0.95,
    ratings: design.ratings,
    derating: design.derating,
  };
}

/** Every check for one mains design and one run (the engine's order and ids). */
export function mainsChecks(design: MainsDesign, result: Pick<MainsResult, 'metrics'>, policy?: DeratingPolicy): Check[] {
  const engine = engineDesignOf(design);
  const p = policy ?? resolvePolicy(undefined, design.derating);
  const m = result.metrics;
  const checks = evaluateChecks(engine, m, p);
  const tHalf = formatEng(m.surgePulseDuration, 's');
  const limiter = design.mains.limiter;
  const relayCloses = m.bypassTime !== null;
  const noCycle = 'The run is shorter than one mains cycle, so this is not checked.';
  const noLimiter = 'There is no inrush limiter in this design, so this does not apply.';
  const limiterName = limiter.kind === 'ntc' ? 'NTC limiter' : 'limiter resistor';
  const replacements: RatingCheckSpec[] = [
    {
      id: 'precharge-pulse-energy',
      label: 'Limiter pulse energy',
      key: 'prechargePulseEnergy',
      unit: 'J',
      part: 'inrush limiter',
      value: limiter.kind === 'none' ? null : m.limiterEnergy,
      notApplicable: limiter.kind === 'none' ? noLimiter : undefined,
      metricName: 'energy the limiter absorbs per power-up (while it carries the current)',
      ratingName: 'single-pulse energy rating',
      subject: (v) => `The ${limiterName} absorbs ${v} per power-up`,
      limitPhrase: (l) => `its ${l} pulse rating`,
      advice: 'Choose a limiter with a higher pulse-energy rating, or lower the capacitance.',
      missing: "the limiter's pulse-energy rating",
    },
    {
      id: 'precharge-peak-power',
      label: 'Limiter peak power',
      key: 'prechargePeakPower',
      unit: 'W',
      part: 'inrush limiter',
      value: limiter.kind === 'none' ? null : m.prechargePeakPower,
      notApplicable: limiter.kind === 'none' ? noLimiter : undefined,
      metricName: 'peak power in the limiter',
      ratingName: 'peak pulse power rating',
      subject: (v) => `The ${limiterName} peaks at ${v}`,
      limitPhrase: (l) => `its ${l} peak-power rating`,
      advice:
        limiter.kind === 'ntc'
          ? 'Choose a limiter with more resistance or a higher peak-power rating; a hot restart leaves an NTC little resistance.'
          : 'Raise the resistance, or choose a resistor with a higher peak-power rating.',
      missing: "the limiter's peak-power rating",
    },
    {
      id: 'fuse-i2t',
      label: 'Fuse melting I²t',
      key: 'fuseMeltingI2t',
      unit: 'A²s',
      part: 'fuse',
      value: m.i2t,
      metricName: 'I²t of the line current over the whole run',
      ratingName: 'melting (pre-arcing) I²t',
      subject: (v) => `The inrush lets through ${v}`,
      limitPhrase: (l) => `the fuse's ${l} melting I²t`,
      advice:
        'Limit the inrush (more limiter resistance; with an NTC, allow for a hot restart) or choose a fuse with a higher melting I²t.',
      missing: "the fuse's melting I²t",
    },
    {
      id: 'diode-surge-current',
      label: 'Diode surge current',
      key: 'diodeSurgeCurrent',
      unit: 'A',
      part: 'rectifier diode',
      value: m.surgeEquivalentCurrent,
      metricName: `half-sine-equivalent surge current of the worst diode pulse (the ${tHalf} half-sine with the same I²t, I = √(2·I²t/t))`,
      ratingName: `surge current IFSM (one ${tHalf} half-sine)`,
      subject: (v) =>
        `The worst diode pulse equals a ${tHalf} half-sine of ${v} (it peaks at ${formatEng(Math.max(...m.diodes.map((d) => d.peakCurrent)), 'A')})`,
      limitPhrase: (l) => `the diode's ${l} surge rating`,
      advice:
        'Limit the inrush (more limiter resistance, or a relay that bypasses it later), or choose a bridge with a higher surge rating.',
      missing: "the diode's surge current (IFSM)",
    },
    {
      id: 'diode-i2t',
      label: 'Diode I²t',
      key: 'diodeI2t',
      unit: 'A²s',
      part: 'rectifier diode',
      value: m.diodeI2t,
      metricName: 'I²t of the worst diode over the whole run (each diode carries only its own pulses)',
      ratingName: 'I²t rating',
      subject: (v) => `The worst diode lets through ${v}`,
      limitPhrase: (l) => `the diode's ${l} I²t rating`,
      advice: 'Limit the inrush, or choose a bridge with a higher I²t rating.',
      missing: "the diode's I²t rating",
    },
    {
      id: 'precharge-continuous-power',
      label: 'Limiter continuous power',
      key: 'prechargeContinuousPower',
      unit: 'W',
      part: 'inrush limiter',
      value: limiter.kind === 'none' || relayCloses ? null : m.limiterContinuousPower,
      notApplicable:
        limiter.kind === 'none'
          ? noLimiter
          : relayCloses
            ? `The relay bypasses the limiter at ${formatEng(m.bypassTime ?? 0, 's')}, so it carries only the inrush; continuous power does not apply.`
            : m.limiterContinuousPower === null
              ? noCycle
              : undefined,
      metricName: "the limiter's average power over the last mains cycle of the run (no relay bypasses it)",
      ratingName: 'continuous power rating',
      subject: (v) => `The limiter stays in circuit and dissipates ${v} on average`,
      limitPhrase: (l) => `its ${l} rating`,
      advice:
        'Add a relay that bypasses the limiter once the capacitor is charged, or choose a limiter rated for the continuous power.',
      missing: "the limiter's continuous power rating",
    },
    {
      id: 'contactor-carry-current',
      label: 'Contactor carry current',
      key: 'contactorCarryCurrent',
      unit: 'A',
      part: limiter.kind === 'none' ? 'mains switch' : 'bypass relay',
      value: limiter.kind !== 'none' && !relayCloses ? null : m.lineRmsCurrent,
      notApplicable:
        limiter.kind !== 'none' && !limiter.bypass
          ? 'This design has no bypass relay, so this does not apply.'
          : limiter.kind !== 'none' && !relayCloses
            ? 'The relay never closes in this run, so it carries no current.'
            : m.lineRmsCurrent === null
              ? noCycle
              : undefined,
      metricName: 'RMS line current over the last mains cycle of the run',
      ratingName: 'continuous current rating',
      subject: (v) =>
        limiter.kind === 'none' ? `The switch that connects the mains carries ${v} RMS` : `The bypass relay carries ${v} RMS`,
      limitPhrase: (l) => `its ${l} rating`,
      advice: 'Choose a relay or switch rated for the RMS line current with margin.',
      missing: limiter.kind === 'none' ? "the mains switch's continuous current rating" : "the relay's continuous current rating",
    },
  ];
  for (const spec of replacements) {
    const at = checks.findIndex((c) => c.id === spec.id);
    const check = ratingCheck(spec, engine.ratings, p.factors[spec.key]);
    if (at >= 0) checks[at] = check;
    else checks.push(check);
  }
  return checks;
}
