// Each part rating in `design.ratings` against the metric it limits, with the derating policy.
// A missing rating is "not checked", and so is a rating whose metric does not apply in this run
// (the bypass never closes, there is no precharge resistor); neither is ever a pass.
import type { Design, RatingKey } from '../design';

import { linkCurrentAt } from './circuit';
import { evaluateDischarge } from './discharge';
import { formatEng, formatFactor, formatPercent } from './format';
import { metric, type CheckMetrics } from './metricsView';
import { resolvePolicy, type DeratingPolicy, type DeratingRule } from './policy';
import { marginPercentOf, statusFor, type Check } from './status';

export interface RatingCheckSpec {
  id: string;
  label: string;
  key: RatingKey;
  unit: string;
  part: string;
  /** The metric in the check's unit; null when it does not apply (then `notApplicable` says why). */
  value: number | null;
  notApplicable?: string;
  /** For the basis: "peak capacitor voltage". */
  metricName: string;
  /** For the basis: "rated voltage". */
  ratingName: string;
  /** "The capacitor peaks at 612 V". */
  subject: (value: string) => string;
  /** "its 450 V rating". */
  limitPhrase: (limit: string) => string;
  /** What to do on a warn or a fail. */
  advice: string;
  /** "the capacitor's rated voltage", for the not-checked message. */
  missing: string;
}

export function ratingCheck(spec: RatingCheckSpec, ratings: Design['ratings'], rule: DeratingRule): Check {
  const limit = ratings[spec.key] ?? null;
  const basis = `${spec.metricName} vs ${spec.ratingName} ${formatFactor(rule.factor)} (${rule.source})`;
  const common = { id: spec.id, label: spec.label, unit: spec.unit, part: spec.part, basis };
  const show = (v: number) => formatEng(v, spec.unit);

  // A part that is not in the circuit (or a metric that does not apply) says so before asking for a rating.
  if (spec.value === null && spec.notApplicable) {
    return {
      ...common,
      value: null,
      limit,
      deratedLimit: limit === null ? null : limit * rule.factor,
      marginPercent: null,
      status: 'not-checked',
      message: spec.notApplicable,
    };
  }
  if (limit === null) {
    const what = spec.value === null ? '' : `${spec.subject(show(spec.value))}; `;
    const sentence = `${what}${spec.missing} is not given, so this is not checked.`;
    return {
      ...common,
      value: spec.value,
      limit: null,
      deratedLimit: null,
      marginPercent: null,
      status: 'not-checked',
      message: sentence.charAt(0).toUpperCase() + sentence.slice(1),
    };
  }
  const deratedLimit = limit * rule.factor;
  if (spec.value === null) {
    return {
      ...common,
      value: null,
      limit,
      deratedLimit,
      marginPercent: null,
      status: 'not-checked',
      message: spec.notApplicable ?? 'This run gives no value to compare, so this is not checked.',
    };
  }
  const value = spec.value;
  const status = statusFor(value, limit, deratedLimit);
  const subject = spec.subject(show(value));
  const message =
    status === 'fail'
      ? `${subject}, ${formatPercent(((value - limit) / limit) * 100)} over ${spec.limitPhrase(show(limit))}. ${spec.advice}`
      : status === 'warn'
        ? `${subject}: inside ${spec.limitPhrase(show(limit))} but past the ${show(deratedLimit)} derated limit (${formatFactor(rule.factor)}). ${spec.advice}`
        : `${subject}, ${formatPercent(marginPercentOf(value, deratedLimit) ?? 0)} inside the ${show(deratedLimit)} derated limit (${show(limit)} ${formatFactor(rule.factor)}).`;
  return { ...common, value, limit, deratedLimit, marginPercent: marginPercentOf(value, deratedLimit), status, message };
}

/** The reverse swing of a polarised capacitor: −min vC against the policy's fixed limit, no derating. */
function reverseVoltageCheck(design: Design, metrics: CheckMetrics, policy: DeratingPolicy): Check {
  const min = metric(metrics.minCapacitorVoltage);
  const value = min === null ? null : Math.max(0, -min);
  const { limit, source } = policy.capacitorReverseVoltage;
  const common = {
    id: 'capacitor-reverse-voltage',
    label: 'Capacitor reverse voltage',
    unit: 'V',
    part: 'DC-link capacitor',
    basis: `reverse swing (minus the minimum capacitor voltage) vs ${limit === null ? 'no limit' : formatEng(limit, 'V')} for a polarised capacitor, no derating (${source})`,
  };
  const notChecked = (message: string, shownLimit: number | null = limit): Check => ({
    ...common,
    value,
    limit: shownLimit,
    deratedLimit: shownLimit,
    marginPercent: null,
    status: 'not-checked',
    message,
  });
  // Applied to the rated capacitor only: without its rating we do not know which part is fitted.
  if (design.ratings.capacitorVoltage === undefined) {
    return notChecked(
      'No capacitor rating is given, so reverse voltage is not checked (a polarised capacitor tolerates about 1.5 V).',
      null,
    );
  }
  if (limit === null)
    return notChecked('The policy treats the DC-link capacitor as non-polarised, so reverse voltage is not checked.');
  if (value === null) return notChecked('This run gives no minimum capacitor voltage, so reverse voltage is not checked.');
  const status = statusFor(value, limit, limit);
  const swing = formatEng(-value, 'V');
  const message =
    value === 0
      ? 'The capacitor voltage never goes below 0 V.'
      : status === 'pass'
        ? `The capacitor reverses to ${swing}, inside the ${formatEng(limit, 'V')} a polarised capacitor tolerates.`
        : `The capacitor reverses to ${swing}, past the ${formatEng(limit, 'V')} a polarised capacitor tolerates. Add damping so the ringing cannot reverse it, or use a non-polarised capacitor.`;
  return { ...common, deratedLimit: limit, value, limit, status, marginPercent: marginPercentOf(value, limit), message };
}

function largestMagnitude(...values: (number | null)[]): number | null {
  const present = values.filter((v): v is number => v !== null).map(Math.abs);
  return present.length ? Math.max(...present) : null;
}

/**
 * Every check for one design and one run: the rating checks in a fixed order, then `discharge`.
 * `policy` is the resolved policy (see `resolvePolicy`); by default the published defaults with the
 * design's own `derating` factors applied.
 */
export function evaluateChecks(design: Design, metrics: CheckMetrics, policy?: DeratingPolicy): Check[] {
  const p = policy ?? resolvePolicy(undefined, design.derating);
  const f = p.factors;
  const r = design.ratings;

  const peakVc = metric(metrics.peakCapacitorVoltage);
  const peakBus = metric(metrics.peakBusVoltage);
  const peakI = largestMagnitude(metric(metrics.peakCurrent), metric(metrics.peakCurrentAfterBypass));
  const i2t = metric(metrics.i2t);
  const bypassTime = metric(metrics.bypassTime);
  const finalVc = metric(metrics.finalCapacitorVoltage);
  const finalCurrent = finalVc === null ? null : Math.abs(linkCurrentAt(design, finalVc));

  const pre = design.precharge;
  const noPrecharge = 'There is no precharge resistor in this design, so this does not apply.';
  const bypassNever = 'The bypass never closes in this run, so the contactor neither makes nor carries current.';
  // The resistor carries current for good only if the bypass never closes (or there is none).
  const resistorStaysIn = pre !== null && (pre.bypass === null || bypassTime === null);
  const continuousPower = pre && resistorStaysIn && finalCurrent !== null ? finalCurrent * finalCurrent * pre.resistance : null;

  // Make current: the bypass contactor's closing peak; with no precharge stage the contactor is the
  // switch that connects the source, so it makes the whole inrush.
  let makeCurrent: number | null = null;
  let makeNa: string | undefined;
  let carryNa: string | undefined;
  if (!pre) makeCurrent = peakI;
  else if (!pre.bypass) makeNa = carryNa = 'This design has no bypass contactor, so this does not apply.';
  else if (bypassTime === null) makeNa = carryNa = bypassNever;
  else makeCurrent = largestMagnitude(metric(metrics.peakCurrentAfterBypass));
  const carryCurrent = carryNa ? null : finalCurrent;

  const specs: RatingCheckSpec[] = [
    {
      id: 'capacitor-voltage',
      label: 'Capacitor voltage',
      key: 'capacitorVoltage',
      unit: 'V',
      part: 'DC-link capacitor',
      value: peakVc,
      metricName: 'peak capacitor voltage',
      ratingName: 'rated voltage',
      subject: (v) => `The capacitor peaks at ${v}`,
      limitPhrase: (l) => `its ${l} rating`,
      advice: "Add series resistance or damping, or raise the capacitor's rating.",
      missing: "the capacitor's rated voltage",
    },
    {
      id: 'capacitor-surge-voltage',
      label: 'Capacitor surge voltage',
      key: 'capacitorSurgeVoltage',
      unit: 'V',
      part: 'DC-link capacitor',
      value: peakVc,
      metricName: 'peak capacitor voltage',
      ratingName: 'surge voltage',
      subject: (v) => `The capacitor peaks at ${v}`,
      limitPhrase: (l) => `its ${l} surge rating`,
      advice: 'Add series resistance or damping, or choose a capacitor with a higher surge rating.',
      missing: "the capacitor's surge voltage",
    },
    {
      id: 'inductor-saturation',
      label: 'Inductor saturation',
      key: 'inductorSaturationCurrent',
      unit: 'A',
      part: 'inductor',
      value: peakI,
      metricName: 'peak |current|',
      ratingName: 'saturation current',
      subject: (v) => `The current peaks at ${v}`,
      limitPhrase: (l) => `the inductor's ${l} saturation current`,
      advice: 'Add series resistance to limit the peak, or choose an inductor with a higher saturation current.',
      missing: "the inductor's saturation current",
    },
    {
      id: 'precharge-pulse-energy',
      label: 'Precharge resistor pulse energy',
      key: 'prechargePulseEnergy',
      unit: 'J',
      part: 'precharge resistor',
      value: pre ? metric(metrics.prechargeEnergy) : null,
      notApplicable: pre ? undefined : noPrecharge,
      metricName: 'energy in the precharge resistor per attempt',
      ratingName: 'single-pulse energy rating',
      subject: (v) => `The precharge resistor absorbs ${v} per attempt`,
      limitPhrase: (l) => `its ${l} pulse rating`,
      advice: 'Choose a resistor with a higher single-pulse energy rating, or lower the capacitance or the bypass threshold.',
      missing: "the precharge resistor's pulse-energy rating",
    },
    {
      id: 'precharge-peak-power',
      label: 'Precharge resistor peak power',
      key: 'prechargePeakPower',
      unit: 'W',
      part: 'precharge resistor',
      value: pre ? metric(metrics.prechargePeakPower) : null,
      notApplicable: pre ? undefined : noPrecharge,
      metricName: 'peak power in the precharge resistor',
      ratingName: 'peak pulse power rating',
      subject: (v) => `The precharge resistor peaks at ${v}`,
      limitPhrase: (l) => `its ${l} peak-power rating`,
      advice: 'Raise the resistance (within the precharge time limit), or choose a resistor with a higher peak-power rating.',
      missing: "the precharge resistor's peak-power rating",
    },
    {
      id: 'precharge-continuous-power',
      label: 'Precharge resistor continuous power',
      key: 'prechargeContinuousPower',
      unit: 'W',
      part: 'precharge resistor',
      value: continuousPower,
      notApplicable: !pre
        ? noPrecharge
        : !resistorStaysIn
          ? `The bypass closes at ${formatEng(bypassTime ?? 0, 's')}, so the resistor carries only the precharge pulse; continuous power does not apply.`
          : 'This run gives no final capacitor voltage, so this is not checked.',
      metricName: 'I²R in the precharge resistor at the end of the run (the bypass never closes)',
      ratingName: 'continuous power rating',
      subject: (v) => `The bypass never closes, so the precharge resistor dissipates ${v} continuously`,
      limitPhrase: (l) => `its ${l} rating`,
      advice: 'Make sure the bypass threshold can be reached, or choose a resistor rated for the continuous power.',
      missing: "the precharge resistor's continuous power rating",
    },
    {
      id: 'contactor-make-current',
      label: 'Contactor make current',
      key: 'contactorMakeCurrent',
      unit: 'A',
      part: 'bypass contactor',
      value: makeNa ? null : makeCurrent,
      notApplicable: makeNa,
      metricName: pre ? 'peak current after the bypass closes' : 'peak inrush current (the contactor connects the source)',
      ratingName: 'making current',
      subject: (v) =>
        pre ? `The contactor makes ${v} when it closes` : `The switch or contactor that connects the source makes ${v}`,
      limitPhrase: (l) => `its ${l} making current`,
      advice: pre
        ? 'Raise the bypass threshold or lengthen the contactor delay so the residual step is smaller, or choose a contactor with a higher making current.'
        : 'Add a precharge stage, or choose a contactor with a higher making current.',
      missing: "the contactor's making current",
    },
    {
      id: 'contactor-carry-current',
      label: 'Contactor carry current',
      key: 'contactorCarryCurrent',
      unit: 'A',
      part: 'bypass contactor',
      value: carryCurrent,
      notApplicable: carryNa ?? 'This run gives no final capacitor voltage, so this is not checked.',
      metricName: 'current at the end of the run (load and bleeder)',
      ratingName: 'continuous current rating',
      subject: (v) =>
        pre
          ? `The contactor carries ${v} at the end of the run`
          : `The switch or contactor that connects the source carries ${v} at the end of the run`,
      limitPhrase: (l) => `its ${l} rating`,
      advice: 'Choose a contactor rated for the continuous current with margin.',
      missing: "the contactor's continuous current rating",
    },
    {
      id: 'fuse-i2t',
      label: 'Fuse melting I²t',
      key: 'fuseMeltingI2t',
      unit: 'A²s',
      part: 'fuse',
      value: i2t,
      metricName: 'I²t of the whole run',
      ratingName: 'melting (pre-arcing) I²t',
      subject: (v) => `The inrush lets through ${v}`,
      limitPhrase: (l) => `the fuse's ${l} melting I²t`,
      advice: pre
        ? 'Limit the inrush (more precharge resistance, a higher bypass threshold) or choose a fuse with a higher melting I²t.'
        : 'Limit the inrush (a precharge stage or more series resistance) or choose a fuse with a higher melting I²t.',
      missing: "the fuse's melting I²t",
    },
    {
      id: 'diode-surge-current',
      label: 'Diode surge current',
      key: 'diodeSurgeCurrent',
      unit: 'A',
      part: 'rectifier diode',
      value: peakI,
      metricName: 'peak |current|',
      ratingName: 'surge current IFSM (one 10 ms or 8.3 ms half-sine)',
      subject: (v) => `The current peaks at ${v}`,
      limitPhrase: (l) => `the diode's ${l} surge rating`,
      advice: 'Limit the inrush, or choose a diode with a higher surge rating.',
      missing: "the diode's surge current (IFSM)",
    },
    {
      id: 'diode-i2t',
      label: 'Diode I²t',
      key: 'diodeI2t',
      unit: 'A²s',
      part: 'rectifier diode',
      value: i2t,
      metricName: 'I²t of the whole run',
      ratingName: 'I²t rating',
      subject: (v) => `The inrush lets through ${v}`,
      limitPhrase: (l) => `the diode's ${l} I²t rating`,
      advice: 'Limit the inrush, or choose a diode with a higher I²t rating.',
      missing: "the diode's I²t rating",
    },
    {
      id: 'switch-voltage',
      label: 'Switch voltage',
      key: 'switchVoltage',
      unit: 'V',
      part: 'switch',
      value: peakBus,
      metricName: 'peak bus voltage',
      ratingName: 'blocking voltage',
      subject: (v) => `The bus peaks at ${v}`,
      limitPhrase: (l) => `the switch's ${l} rating`,
      advice: 'Add a snubber or damping, or reduce the loop inductance, or choose a switch with a higher voltage rating.',
      missing: "the switch's blocking voltage",
    },
    {
      id: 'cable-i2t',
      label: 'Cable I²t',
      key: 'cableI2t',
      unit: 'A²s',
      part: 'cable',
      value: i2t,
      metricName: 'I²t of the whole run',
      ratingName: 'cable I²t limit',
      subject: (v) => `The inrush lets through ${v}`,
      limitPhrase: (l) => `the cable's ${l} limit`,
      advice: 'Limit the inrush, or use a cable or busbar with a larger cross-section.',
      missing: "the cable's I²t limit",
    },
  ];

  const checks = specs.map((spec) => ratingCheck(spec, r, f[spec.key]));
  // The reverse-voltage check sits next to the capacitor's other checks.
  checks.splice(2, 0, reverseVoltageCheck(design, metrics, p));
  checks.push(evaluateDischarge(design, metrics, p.discharge));
  return checks;
}
