/**
 * A parsed `Design` written back as a design file (`DesignInput`, SI numbers), so that a spread
 * corner can be opened as a design of its own. parseDesign(toDesignInput(d)) gives d back (tested).
 */
import type { Design, DesignInput } from '../design';
import type { MainsDesign, MainsDesignInput } from '../mains/schema';

export function toDesignInput(design: Design): DesignInput {
  const input: DesignInput = {
    source: { ...design.source },
    capacitor: { ...design.capacitor },
    initial: { ...design.initial },
    duration: design.duration,
    points: design.points,
    settleFraction: design.settleFraction,
  };
  if (design.name !== null) input.name = design.name;
  if (design.notes !== null) input.notes = design.notes;
  if (design.precharge) {
    const { bypass } = design.precharge;
    input.precharge = { resistance: design.precharge.resistance };
    if (bypass) {
      input.precharge.bypass = {
        when: bypass.when,
        fraction: bypass.fraction,
        delay: bypass.delay,
        ...(bypass.time !== null ? { time: bypass.time } : {}),
      };
    }
  }
  if (design.filter) input.filter = { ...design.filter };
  if (design.damping) input.damping = { ...design.damping };
  if (design.bleeder) input.bleeder = { ...design.bleeder };
  if (design.load) input.load = { ...design.load };
  if (Object.keys(design.ratings).length) input.ratings = { ...design.ratings };
  if (Object.keys(design.derating).length) input.derating = { ...design.derating };
  return input;
}

/**
 * A parsed `MainsDesign` written back as a mains design file (SI numbers, the angle in degrees,
 * temperatures in K), optionally at another switch-on angle, so that a mains spread's corner opens
 * as a design at the angle it was judged at. parseMainsDesign(toMainsDesignInput(d)) gives d back (tested).
 */
export function toMainsDesignInput(design: MainsDesign, angle?: number): MainsDesignInput {
  const m = design.mains;
  const limiter = m.limiter;
  const bypass = limiter.kind !== 'none' && limiter.bypass ? { bypass: { delay: limiter.bypass.delay } } : {};
  const input: MainsDesignInput = {
    mains: {
      kind: m.kind,
      voltage: m.voltage,
      frequency: m.frequency,
      angle: angle ?? m.angle,
      lineResistance: m.lineResistance,
      lineInductance: m.lineInductance,
      diode: { ...m.diode },
      limiter:
        limiter.kind === 'none'
          ? { kind: 'none' }
          : limiter.kind === 'resistor'
            ? { kind: 'resistor', resistance: limiter.resistance, ...bypass }
            : {
                kind: 'ntc',
                r25: limiter.r25,
                beta: limiter.beta,
                startTemperature: limiter.startTemperature,
                ...(limiter.thermal ? { thermal: { ...limiter.thermal } } : {}),
                ...bypass,
              },
    },
    capacitor: { ...design.capacitor },
    initial: { ...design.initial },
    duration: design.duration,
    points: design.points,
  };
  if (design.name !== null) input.name = design.name;
  if (design.notes !== null) input.notes = design.notes;
  if (design.damping) input.damping = { ...design.damping };
  if (design.bleeder) input.bleeder = { ...design.bleeder };
  if (design.load) input.load = { ...design.load };
  if (Object.keys(design.ratings).length) input.ratings = { ...design.ratings };
  if (Object.keys(design.derating).length) input.derating = { ...design.derating };
  return input;
}
