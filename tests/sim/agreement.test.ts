/**
 * The three solvers are independent implementations of the same model (closed form from the
 * analytic response, exact propagation from the matrix exponential of the state matrix, odex from
 * the right-hand side written directly): on random circuits they must agree to 1e−8 of the peak.
 */
import * as fc from 'fast-check';

import { parseDesign, type Design, type DesignInput } from '@/sim/design';
import type { RawRun } from '@/sim/metrics';
import { circuitOf, evaluate, linearSystem, networkOf } from '@/sim/model/circuit';
import { N_AUG } from '@/sim/model/layout';
import { closedFormStateAt, runClosedForm } from '@/sim/solvers/closedForm';
import { runLinear, sampleLinear } from '@/sim/solvers/linear';
import { runOde } from '@/sim/solvers/ode';

import { expectClose } from '../helpers/expectClose';
import { fullCircuit, logUniform, seriesCircuit, uniform } from './arbitraries';

const SEED = 31415;
const TOL = 1e-8;

function times(duration: number, n = 300): number[] {
  return Array.from({ length: n }, (_, k) => (duration * k) / (n - 1));
}

function maxRel(a: number[], b: number[], scale: number): number {
  let worst = 0;
  for (let k = 0; k < a.length; k++) worst = Math.max(worst, Math.abs(a[k] - b[k]) / scale);
  return worst;
}

function scales(raw: RawRun) {
  return { vC: Math.max(Math.abs(raw.vCMax.value), Math.abs(raw.vCMin.value)) || 1, i: raw.iAbsMax.value || 1 };
}

function compareRaw(a: RawRun, b: RawRun) {
  const s = scales(a);
  expectClose(a.vCMax.value, b.vCMax.value, 0, TOL * s.vC);
  expectClose(a.vCMin.value, b.vCMin.value, 0, TOL * s.vC);
  expectClose(a.iAbsMax.value, b.iAbsMax.value, 0, TOL * s.i);
  expectClose(a.vMax.value, b.vMax.value, 0, TOL * Math.max(s.vC, Math.abs(a.vMax.value)));
  expectClose(a.finalCapacitorVoltage, b.finalCapacitorVoltage, 0, TOL * s.vC);
  expectClose(a.i2t, b.i2t, TOL, 1e-300);
  if (a.bypassTime !== null || b.bypassTime !== null) expectClose(a.bypassTime, b.bypassTime ?? NaN, TOL);
  if (a.i2tAfterBypass !== null) expectClose(a.i2tAfterBypass, b.i2tAfterBypass ?? NaN, 1e-7);
}

function agreeOnSeries(input: DesignInput) {
  const design = parseDesign(input);
  const t = times(design.duration);
  const closed = runClosedForm(design, null);
  expect(closed).not.toBeNull();
  if (!closed) return;
  const exact = runLinear(design, { settle: null });
  const exactSamples = sampleLinear(exact, t, null);
  const ode = runOde(design, { relativeTolerance: 1e-12, maxEvaluations: 2_000_000, settle: null, sampleTimes: t });
  expect(ode.ok).toBe(true);
  const s = scales(closed.raw);
  const cf = t.map((x) => closedFormStateAt(closed, x));
  const cfVC = cf.map((x) => x[1]);
  const cfI = cf.map((x) => x[0]);
  expect(maxRel(exactSamples.vC, cfVC, s.vC)).toBeLessThan(TOL);
  expect(maxRel(exactSamples.i, cfI, s.i)).toBeLessThan(TOL);
  expect(maxRel(ode.samples.vC, cfVC, s.vC)).toBeLessThan(TOL);
  expect(maxRel(ode.samples.i, cfI, s.i)).toBeLessThan(TOL);
  compareRaw(exact.raw, closed.raw);
  compareRaw(ode.raw as RawRun, closed.raw);
}

describe('closed form, exact propagation and odex agree', () => {
  it('on random series RLC circuits in every damping class, with initial energy', () => {
    fc.assert(fc.property(seriesCircuit, agreeOnSeries), { seed: SEED, numRuns: 40 });
  });

  it('on random precharge designs with a voltage-triggered bypass and a closing delay', () => {
    const precharge = fc
      .record({
        base: seriesCircuit,
        pre: logUniform(1, 200),
        fraction: uniform(0.5, 0.99),
        delayShare: uniform(0, 0.3),
      })
      .map(({ base, pre, fraction, delayShare }): DesignInput => {
        const c = Number((base.capacitor as { capacitance: number }).capacitance);
        const rc = pre * c;
        return {
          ...base,
          source: { ...(base.source as object), voltage: 400 },
          initial: { capacitorVoltage: 0, inductorCurrent: 0 },
          precharge: { resistance: pre, bypass: { when: 'voltage', fraction, delay: delayShare * rc } },
          duration: rc * 5 + Number(base.duration),
        };
      });
    fc.assert(fc.property(precharge, agreeOnSeries), { seed: SEED + 1, numRuns: 15 });
  });
});

describe('exact propagation and odex agree on circuits without a closed form', () => {
  it('with damping branch, bleeder, resistive or constant-current load from a start time, and a source ramp', () => {
    fc.assert(
      fc.property(fullCircuit, (input) => {
        const design = parseDesign(input);
        const t = times(design.duration);
        const exact = runLinear(design, { settle: null });
        const samples = sampleLinear(exact, t, null);
        const ode = runOde(design, { relativeTolerance: 1e-12, maxEvaluations: 2_000_000, settle: null, sampleTimes: t });
        expect(ode.ok).toBe(true);
        const s = scales(exact.raw);
        expect(maxRel(samples.vC, ode.samples.vC, s.vC)).toBeLessThan(TOL);
        expect(maxRel(samples.i, ode.samples.i, s.i)).toBeLessThan(TOL);
        expect(maxRel(samples.vD, ode.samples.vD, s.vC)).toBeLessThan(TOL);
        compareRaw(exact.raw, ode.raw as RawRun);
      }),
      { seed: SEED + 2, numRuns: 30 },
    );
  });
});

describe('the two encodings of the model equations', () => {
  it('state matrix rows (exact path) and the direct right-hand side (ODE path) give the same derivatives', () => {
    fc.assert(
      fc.property(
        fullCircuit,
        fc.array(uniform(-50, 50), { minLength: 3, maxLength: 3 }),
        uniform(0, 1),
        (input, state, share) => {
          const design: Design = parseDesign(input);
          const circuit = circuitOf(design);
          for (const config of [
            { bypassClosed: true, loadConnected: true, ramping: true },
            { bypassClosed: true, loadConnected: false, ramping: false },
          ]) {
            const net = networkOf(circuit, config);
            const sys = linearSystem(net);
            const t = share * design.duration;
            const z = [...state, 1, t];
            const direct = evaluate(net, t, state, 'off');
            for (let k = 0; k < 3; k++) {
              let fromMatrix = 0;
              for (let j = 0; j < N_AUG; j++) fromMatrix += sys.M[k * N_AUG + j] * z[j];
              expectClose(fromMatrix, direct.dy[k], 1e-11, 1e-9 * (Math.abs(fromMatrix) + 1));
            }
            let v = 0;
            for (let j = 0; j < N_AUG; j++) v += sys.v[j] * z[j];
            expectClose(v, direct.v, 1e-12, 1e-12);
          }
        },
      ),
      { seed: SEED + 3, numRuns: 50 },
    );
  });
});
