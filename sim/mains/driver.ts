/**
 * The bridge as a switched system: the run is cut into pieces in which the bridge state (one pair
 * conducting, or blocking), the limiter (in or bypassed) and the load (connected or not) are fixed.
 * A piece ends at a known time (a sector boundary, the relay closing, the load connecting, the end
 * of the run) or at a state event that the piece's solver locates:
 *
 *   conducting → blocking   when the current reaches 0 going down (the diodes cannot reverse);
 *   blocking  → conducting  when e_p − v rises through 0: the source, less two forward drops,
 *                           exceeds the bus (with L > 0 this is di/dt > 0 at i = 0; with L = 0 it is
 *                           i = (e_p − v)/R > 0), p the sector's candidate pair.
 *
 * Three-phase: at each sector boundary while conducting, the current passes at once to the next
 * pair (instantaneous commutation, README); single-phase: the pair conducts past the zero crossing
 * of v_s until its current reaches 0 (the line inductance carries it on).
 *
 * Pieces also end where the last full mains cycle of the run begins, so that the running averages
 * over it (the limiter's power, the line's RMS current) come from whole pieces.
 *
 * At the start of a piece that follows a known time (and at switch-on) the bridge state is decided
 * from the values there: a blocking bridge starts conducting if e_p − v > 0 (or = 0 and rising), a
 * conducting one stops if i = 0 and falling. After a state event the new state is taken as it is;
 * the piece solver treats the event's own zero as on the right side of it.
 */
import { candidatePair, sectorAt, sectorEnd } from './bridge';
import type { Configuration, MainsModel } from './model';
import type { Recorder } from './record';

export interface Probe {
  i: number;
  di: number;
  g: number;
  dg: number;
}

export interface PieceOutcome<S> {
  t: number;
  state: S;
  /** A state event ended the piece (the bridge changes state at `t`). */
  hit: boolean;
}

export interface PieceSolver<S> {
  probe(config: Configuration, t: number, state: S): Probe;
  /** Runs [t0, tEnd], stopping at the bridge's state event; null when the solver gave up (it says why in `failure`). */
  run(config: Configuration, t0: number, state: S, tEnd: number): PieceOutcome<S> | null;
  /** The state entering `config` at t (the current set to 0 where the bridge opens or starts). */
  enter(config: Configuration, t: number, state: S, fromConducting: boolean): S;
  failure: string | null;
}

export interface DriveResult<S> {
  ok: boolean;
  state: S;
  failure: string | null;
  /** When the relay closed within the run. */
  bypassTime: number | null;
  pieces: number;
}

/**
 * The event functions' zeros sit this far (relative to the scales) beyond the event: a piece that
 * starts on the event's own zero (e_p − v = ±1e−14 V after the root finder) can dip to the wrong
 * side by rounding for an instant, which is not an event. It moves a real event by this fraction of
 * the scale over the crossing slope (≈ 1e−15 s here).
 */
export const WATCH_FLOOR = 1e-12;

/** The voltage and current scales of the event functions and decisions. */
export function watchScales(model: MainsModel): { voltage: number; current: number } {
  const voltage = model.bridge.peak;
  const impedance = Math.max(model.rLoop + model.rLimiterStart, model.L > 0 ? Math.sqrt(model.L / model.c) : 0, 1e-9);
  return { voltage, current: voltage / impedance };
}

/** Relative tolerance of the start decisions (on volts and amperes). */
const DECISION_TOLERANCE = 1e-12;
/** State events closer than this (relative to the run) count as one burst; a long burst is a failure. */
const BURST_WINDOW = 1e-10;
const BURST_LIMIT = 40;
const PIECE_LIMIT = 200_000;

export function drive<S>(model: MainsModel, recorder: Recorder, solver: PieceSolver<S>, initial: S): DriveResult<S> {
  const { bridge } = model;
  const T = model.duration;
  const scales = watchScales(model);
  const vScale = scales.voltage;
  const iScale = scales.current;
  let sector = sectorAt(bridge, 0);
  let conducting = false;
  let pair = candidatePair(bridge, sector);
  let afterStateEvent = false;
  let state = initial;
  let t = 0;
  let pieces = 0;
  let burst = 0;
  let lastEvent = -Infinity;
  let bypassed = false;
  let loadOn = false;
  const label = (p: number) => bridge.pairs[p].label;
  recorder.event(0, 'switch-on', null);

  while (t < T) {
    if (++pieces > PIECE_LIMIT) return { ok: false, state, failure: 'too many bridge events', bypassTime: null, pieces };
    const limiterIn = model.limiter.kind !== 'none' && !(model.bypassTime !== null && t >= model.bypassTime);
    const loadConnected = model.load !== null && t >= model.load.start;
    if (!limiterIn && model.limiter.kind !== 'none' && !bypassed) {
      bypassed = true;
      recorder.event(t, 'bypass', conducting ? label(pair) : null);
    }
    if (loadConnected && !loadOn) {
      loadOn = true;
      if (t > 0 || (model.load?.start ?? 0) > 0) recorder.event(t, 'load-connects', conducting ? label(pair) : null);
    }
    // Blocking, the candidate is the sector's pair; conducting three-phase, the sector's pair too.
    if (!conducting || bridge.kind === 'three-phase') pair = candidatePair(bridge, sector);
    let config: Configuration = { conducting, pair, limiterIn, loadConnected };
    if (!afterStateEvent) {
      const p = solver.probe(config, t, state);
      const gTol = DECISION_TOLERANCE * vScale;
      const iTol = DECISION_TOLERANCE * iScale;
      if (!conducting && (p.g > gTol || (p.g >= -gTol && p.dg > 0))) {
        conducting = true;
        config = { ...config, conducting };
        state = solver.enter(config, t, state, false);
        recorder.event(t, 'conduction-start', label(pair));
      } else if (conducting && p.i <= iTol && (p.di < 0 || (p.di === 0 && p.g < 0))) {
        conducting = false;
        config = { ...config, conducting };
        state = solver.enter(config, t, state, true);
        recorder.event(t, 'conduction-end', null);
      }
    }
    let tEnd = Math.min(T, sectorEnd(bridge, sector));
    if (model.bypassTime !== null && model.bypassTime > t) tEnd = Math.min(tEnd, model.bypassTime);
    if (model.load && model.load.start > t) tEnd = Math.min(tEnd, model.load.start);
    if (model.windowStart !== null && model.windowStart > t) tEnd = Math.min(tEnd, model.windowStart);

    const outcome = solver.run(config, t, state, tEnd);
    if (!outcome) return { ok: false, state, failure: solver.failure ?? 'the solver failed', bypassTime: null, pieces };
    state = outcome.state;
    if (outcome.hit) {
      const tStop = outcome.t;
      burst = tStop - lastEvent <= BURST_WINDOW * T ? burst + 1 : 0;
      lastEvent = tStop;
      if (burst > BURST_LIMIT) {
        return {
          ok: false,
          state,
          failure: 'the bridge switches back and forth at one instant (a grazing conduction)',
          bypassTime: null,
          pieces,
        };
      }
      const wasConducting = conducting;
      conducting = !conducting;
      const next: Configuration = { ...config, conducting };
      state = solver.enter(next, tStop, state, wasConducting);
      recorder.event(tStop, conducting ? 'conduction-start' : 'conduction-end', conducting ? label(pair) : null);
      afterStateEvent = true;
      t = tStop;
      continue;
    }
    afterStateEvent = false;
    if (tEnd === sectorEnd(bridge, sector)) {
      sector++;
      if (conducting && bridge.kind === 'three-phase' && tEnd < T) {
        const nextPair = candidatePair(bridge, sector);
        state = solver.enter({ ...config, pair: nextPair }, tEnd, state, true);
        recorder.event(tEnd, 'commutation', label(nextPair));
      }
    }
    t = tEnd;
  }
  const bypassTime =
    model.bypassTime !== null && model.bypassTime <= T && model.limiter.kind !== 'none' ? model.bypassTime : null;
  return { ok: true, state, failure: null, bypassTime, pieces };
}
