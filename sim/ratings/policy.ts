// The derating policy: how far below each absolute rating a part should be worked, and the
// touch-safe discharge rule. Defaults are named with their source; a team overrides them (admin
// edits, validated by `deratingPolicySchema`) and a design overrides the team (`design.derating`).
//
// Source tags as in REFERENCE.md: [pub] published, [mem] recalled from memory (verify before relying
// on the exact figure), [cp] common practice without a single published source.

import { z } from 'zod';

import { RATING_KEYS, type RatingKey } from '../design';

import { invalidInput } from './errors';

// The rating keys are the design file's own (RATING_KEYS in sim/design.ts); `design.derating` uses
// the same keys.

export interface DeratingRule {
  /** Fraction of the absolute rating the part may be worked to, 0 < factor ≤ 1. */
  factor: number;
  /** Where the factor comes from, shown in each check's basis. */
  source: string;
}

export type DeratingFactors = Record<RatingKey, DeratingRule>;

export interface DischargePolicy {
  /** Touch-safe residual voltage, V. */
  thresholdVoltage: number;
  /** Time allowed to get below it after the source is removed, s. */
  allowedTime: number;
  /** Stored charge at or below which the residual-voltage rule does not apply, C. */
  exemptCharge: number;
  /** Count a resistive load as a discharge path (it must stay connected when the source is removed). */
  loadStaysConnected: boolean;
  source: string;
}

export interface ReverseVoltagePolicy {
  /** Reverse voltage a polarised DC-link capacitor may see, V; null when the capacitor is not polarised. */
  limit: number | null;
  source: string;
}

export interface DeratingPolicy {
  factors: DeratingFactors;
  discharge: DischargePolicy;
  capacitorReverseVoltage: ReverseVoltagePolicy;
}

export const defaultDerating: DeratingFactors = {
  // [cp] Aluminium electrolytics are commonly worked at ≤ 80 % of rated voltage for life and margin.
  capacitorVoltage: { factor: 0.8, source: 'common practice for aluminium electrolytics' },
  // [cp] A surge rating is a short-time rating for a limited number of events (the surge test of
  // IEC 60384-4, recalled from memory [mem]); power-up happens every time, so keep 10 % below it.
  capacitorSurgeVoltage: { factor: 0.9, source: 'common practice: surge ratings are for rare, short events' },
  // [cp] Saturation current is quoted at a given inductance drop and falls as the core heats.
  inductorSaturationCurrent: { factor: 0.8, source: 'common practice: Isat falls with core temperature' },
  // [cp] REFERENCE §2: size the pulse rating ≥ ½CV²max with tolerance and margin; half the rating is
  // the usual margin for wirewound and thick-film pulse resistors.
  prechargePulseEnergy: { factor: 0.5, source: 'common practice for precharge resistors (pulse rating ≥ 2 × energy)' },
  // [cp] As for the pulse energy: the peak V²/R is judged against half the peak-power rating.
  prechargePeakPower: { factor: 0.5, source: 'common practice for precharge resistors' },
  // [mem] NASA EEE-INST-002 derates resistor continuous power to about 50–60 % of rated (recalled from
  // memory); 0.5 is the usual figure.
  prechargeContinuousPower: { factor: 0.5, source: 'NASA EEE-INST-002 resistor power derating, about 50 % (from memory)' },
  // [cp] Making capacity is tested at the rated value; keep 20 % for contact wear and bounce.
  contactorMakeCurrent: { factor: 0.8, source: 'common practice for contactor making current' },
  // [mem] NFPA 70 (NEC) sizes conductors and overcurrent devices at 125 % of a continuous load, i.e.
  // a continuous load at ≤ 80 % of the rating (210.19/210.20, from memory).
  contactorCarryCurrent: { factor: 0.8, source: 'NEC practice: continuous load ≤ 80 % of rating (from memory)' },
  // [cp] REFERENCE §5: under repetitive pulses allow only a fraction of the melting I²t, about 38 % for
  // 1 000 pulses (22 % for 100 000). A DC link powers up on the order of a thousand times.
  fuseMeltingI2t: { factor: 0.38, source: 'common practice: 38 % of melting I²t for 1 000 pulses (22 % for 100 000)' },
  // [mem] NASA EEE-INST-002 derates diode surge current to about 50 % of IFSM (recalled from memory).
  // IFSM is a non-repetitive rating and power-up is repetitive (REFERENCE §5, [cp]).
  diodeSurgeCurrent: { factor: 0.5, source: 'NASA EEE-INST-002 diode surge derating, about 50 % (from memory)' },
  // [cp] The same margin on the diode's I²t (IFSM²·t/2 for a 10 ms half-sine, REFERENCE §5).
  diodeI2t: { factor: 0.5, source: 'common practice, as for the diode surge current' },
  // [pub] MIL-DTL-917, FET derating table (REFERENCE §5): repetitive peak ≤ 0.7 × rated, non-repetitive
  // ≤ 0.8 ×. Power-up and switching overshoots recur every time, so the repetitive figure applies.
  switchVoltage: { factor: 0.7, source: 'MIL-DTL-917: repetitive peak ≤ 70 % of rated voltage' },
  // [cp] A cable's adiabatic I²t limit is a short-circuit (rare-event) limit.
  cableI2t: { factor: 0.8, source: 'common practice: cable I²t limits are for rare faults' },
};

export const defaultDischarge: DischargePolicy = {
  // [pub] IEC 60204-1:2016, 6.2.4 (REFERENCE §6): live parts above 60 V must fall to ≤ 60 V within 5 s
  // after disconnection; parts storing ≤ 60 µC are exempt.
  thresholdVoltage: 60,
  allowedTime: 5,
  exemptCharge: 60e-6,
  // Conservative: a converter load usually stops drawing when the source goes, so only the bleeder
  // is counted unless the team says the resistive load stays connected.
  loadStaysConnected: false,
  source: 'IEC 60204-1:2016, 6.2.4: ≤ 60 V within 5 s after disconnection',
};

export const defaultReverseVoltage: ReverseVoltagePolicy = {
  // [cp] Polarised aluminium electrolytics tolerate about 1–1.5 V reverse for short times; 1.5 V is
  // the usual ceiling. A team using film capacitors sets the limit to null (not polarised).
  limit: 1.5,
  source: 'common practice: polarised aluminium electrolytics tolerate about 1.5 V reverse',
};

export const defaultPolicy: DeratingPolicy = {
  factors: defaultDerating,
  discharge: defaultDischarge,
  capacitorReverseVoltage: defaultReverseVoltage,
};

// A factor of 0 would make every value "past the derated limit"; it is rejected rather than obeyed.
const factorSchema = z
  .number({ error: 'must be a number between 0 and 1' })
  .gt(0, { error: 'must be greater than 0 (a derating factor of 0 allows nothing)' })
  .lte(1, { error: 'must be at most 1 (a factor above 1 would allow more than the rating)' });

const ruleOverrideSchema = z.union([
  factorSchema,
  z.object({ factor: factorSchema, source: z.string().trim().min(1).max(300).optional() }).strict(),
]);

/** A team's override of the defaults, as an admin edits it. Every part is optional. */
export const deratingPolicySchema = z
  .object({
    factors: z
      .object(
        Object.fromEntries(RATING_KEYS.map((k) => [k, ruleOverrideSchema.optional()])) as Record<
          RatingKey,
          z.ZodOptional<typeof ruleOverrideSchema>
        >,
      )
      .strict()
      .optional(),
    discharge: z
      .object({
        thresholdVoltage: z.number().positive({ error: 'must be a voltage above 0 V' }).optional(),
        allowedTime: z.number().positive({ error: 'must be a time above 0 s' }).optional(),
        exemptCharge: z.number().min(0, { error: 'must be a charge of 0 C or more' }).optional(),
        loadStaysConnected: z.boolean().optional(),
        source: z.string().trim().min(1).max(300).optional(),
      })
      .strict()
      .optional(),
    capacitorReverseVoltage: z
      .object({
        limit: z.number().min(0, { error: 'must be 0 V or more, or null for a non-polarised capacitor' }).nullable(),
        source: z.string().trim().min(1).max(300).optional(),
      })
      .strict()
      .optional(),
  })
  .strict();

export type DeratingPolicyOverride = z.infer<typeof deratingPolicySchema>;

/** `design.derating`: the same keys as the ratings, each a factor. */
export type DesignDerating = Partial<Record<RatingKey, number>>;

const designDeratingSchema = z
  .object(
    Object.fromEntries(RATING_KEYS.map((k) => [k, factorSchema.optional()])) as Record<
      RatingKey,
      z.ZodOptional<typeof factorSchema>
    >,
  )
  .strict();

function issuesOf(error: z.ZodError, prefix: string): { path: string; message: string }[] {
  const issues: { path: string; message: string }[] = [];
  for (const issue of error.issues) {
    const path = [prefix, ...issue.path.map(String)].join('.');
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) issues.push({ path: `${path}.${key}`, message: `unknown field "${key}"` });
    } else {
      issues.push({ path, message: issue.message });
    }
  }
  return issues;
}

/**
 * The policy in force for one design: the defaults, then the team's override, then the design's own
 * `derating` factors. Invalid factors throw the engine's `DesignError` naming the field, e.g.
 * `derating.capacitorVoltage: must be at most 1 …`.
 */
export function resolvePolicy(teamOverrides?: unknown, designDerating?: unknown): DeratingPolicy {
  const factors: DeratingFactors = { ...defaultDerating };
  let discharge: DischargePolicy = { ...defaultDischarge };
  let reverse: ReverseVoltagePolicy = { ...defaultReverseVoltage };

  if (teamOverrides !== undefined && teamOverrides !== null) {
    const team = deratingPolicySchema.safeParse(teamOverrides);
    if (!team.success) throw invalidInput(issuesOf(team.error, 'policy'));
    for (const key of RATING_KEYS) {
      const o = team.data.factors?.[key];
      if (o === undefined) continue;
      factors[key] =
        typeof o === 'number' ? { factor: o, source: 'team policy' } : { factor: o.factor, source: o.source ?? 'team policy' };
    }
    if (team.data.discharge) {
      const d = team.data.discharge;
      const changed = d.thresholdVoltage !== undefined || d.allowedTime !== undefined || d.exemptCharge !== undefined;
      discharge = {
        thresholdVoltage: d.thresholdVoltage ?? discharge.thresholdVoltage,
        allowedTime: d.allowedTime ?? discharge.allowedTime,
        exemptCharge: d.exemptCharge ?? discharge.exemptCharge,
        loadStaysConnected: d.loadStaysConnected ?? discharge.loadStaysConnected,
        source: d.source ?? (changed ? 'team policy' : discharge.source),
      };
    }
    if (team.data.capacitorReverseVoltage) {
      const r = team.data.capacitorReverseVoltage;
      reverse = { limit: r.limit, source: r.source ?? 'team policy' };
    }
  }

  if (designDerating !== undefined && designDerating !== null) {
    const own = designDeratingSchema.safeParse(designDerating);
    if (!own.success) throw invalidInput(issuesOf(own.error, 'derating'));
    for (const key of RATING_KEYS) {
      const f = own.data[key];
      if (f !== undefined) factors[key] = { factor: f, source: 'set in this design' };
    }
  }

  return { factors, discharge, capacitorReverseVoltage: reverse };
}
