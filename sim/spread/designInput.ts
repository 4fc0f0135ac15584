/**
 * A parsed `Design` written back as a design file (`DesignInput`, SI numbers), so that a spread
 * corner can be opened as a design of its own. parseDesign(toDesignInput(d)) gives d back (tested).
 */
import type { Design, DesignInput } from '../design';

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
