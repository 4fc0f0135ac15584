// The single check, run in the browser as the engineer types: validate the working copy, simulate,
// compare with the ratings, collect the notices. Debounced so that a burst of keystrokes costs one
// run; the last good answer stays on screen (dimmed) while the inputs have a problem.
import { useEffect, useRef, useState } from 'react';
import { safeParseDesign, simulate, type Design } from '@/sim';
import type { DesignIssue } from '@/sim/errors';
import { buildNotices } from '@/sim/notices';
import { evaluateChecks, resolvePolicy, type Check } from '@/sim/ratings';
import { engineDesignOf, mainsChecks, safeParseMainsDesign, simulateMains } from '@/sim/mains';
import type { NoticeView } from '@/components/results/HighVoltageNotice';
import type { WaveformData } from '@/components/charts/waveformGeometry';

export const LIVE_DEBOUNCE_MS = 150;
/** Enough points for a smooth chart on a wide screen; the saved revision uses the design's own. */
export const LIVE_POINTS = 1500;

export interface LiveResult {
  design: Design;
  metrics: Record<string, unknown>;
  solvers: unknown;
  waveform: WaveformData;
  warnings: unknown[];
  checks: Check[];
  notices: NoticeView[];
  /** How long the run took in the browser, ms. */
  elapsedMs: number;
}

export interface LiveState {
  result: LiveResult | null;
  /** Problems with the current inputs (then `result` is the last good one, or null). */
  issues: DesignIssue[];
  /** The engine could not run this design (a solver failure, not an input problem). */
  failure: string | null;
  pending: boolean;
}

export function runLiveCheck(
  draft: unknown,
  teamPolicy: unknown,
): { result: LiveResult } | { issues: DesignIssue[] } | { failure: string } {
  if (isMainsDraft(draft)) return runLiveMainsCheck(draft, teamPolicy);
  const parsed = safeParseDesign(draft);
  if (!parsed.ok) return { issues: parsed.issues };
  const started = typeof performance !== 'undefined' ? performance.now() : Date.now();
  try {
    const design = parsed.design;
    const run = simulate(design, { points: Math.min(design.points, LIVE_POINTS) });
    const policy = resolvePolicy(teamPolicy ?? undefined, design.derating);
    const checks = evaluateChecks(design, run.metrics, policy);
    const notices = buildNotices(design, run) as NoticeView[];
    const elapsedMs = (typeof performance !== 'undefined' ? performance.now() : Date.now()) - started;
    return {
      result: {
        design,
        metrics: run.metrics as unknown as Record<string, unknown>,
        solvers: run.solvers,
        waveform: run.waveform as WaveformData,
        warnings: (run.warnings ?? []) as unknown[],
        checks,
        notices,
        elapsedMs,
      },
    };
  } catch (error) {
    const issues = (error as { issues?: DesignIssue[] })?.issues;
    if (Array.isArray(issues) && issues.length) return { issues };
    return { failure: error instanceof Error ? error.message : String(error) };
  }
}

/** A mains design (sim/mains: bridge rectifier from the AC mains) is one with a `mains` section. */
export function isMainsDraft(draft: unknown): boolean {
  return typeof draft === 'object' && draft !== null && !Array.isArray(draft) && 'mains' in draft;
}

function runLiveMainsCheck(draft: unknown, teamPolicy: unknown): { result: LiveResult } | { issues: DesignIssue[] } | { failure: string } {
  const parsed = safeParseMainsDesign(draft);
  if (!parsed.ok) return { issues: parsed.issues };
  const started = typeof performance !== 'undefined' ? performance.now() : Date.now();
  try {
    const mains = parsed.design;
    const design = engineDesignOf(mains);
    const run = simulateMains(mains, { points: Math.min(mains.points, LIVE_POINTS), crossCheck: false });
    const policy = resolvePolicy(teamPolicy ?? undefined, mains.derating);
    const checks = mainsChecks(mains, run, policy);
    const notices = buildNotices(design, run as never) as NoticeView[];
    const elapsedMs = (typeof performance !== 'undefined' ? performance.now() : Date.now()) - started;
    return {
      result: {
        design,
        metrics: run.metrics as unknown as Record<string, unknown>,
        solvers: run.solvers,
        waveform: run.waveform as unknown as WaveformData,
        warnings: (run.warnings ?? []) as unknown[],
        checks,
        notices,
        elapsedMs,
      },
    };
  } catch (error) {
    const issues = (error as { issues?: DesignIssue[] })?.issues;
    if (Array.isArray(issues) && issues.length) return { issues };
    return { failure: error instanceof Error ? error.message : String(error) };
  }
}

export function useLiveCheck(draft: unknown, teamPolicy: unknown): LiveState {
  const [state, setState] = useState<LiveState & { ranFor: unknown; ranPolicy: unknown }>({
    result: null,
    issues: [],
    failure: null,
    pending: true,
    ranFor: undefined,
    ranPolicy: undefined,
  });
  const first = useRef(true);
  useEffect(() => {
    const timer = setTimeout(
      () => {
        const outcome = runLiveCheck(draft, teamPolicy);
        const ran = { ranFor: draft, ranPolicy: teamPolicy, pending: false };
        setState((s) =>
          'result' in outcome
            ? { result: outcome.result, issues: [], failure: null, ...ran }
            : 'issues' in outcome
              ? { result: s.result, issues: outcome.issues, failure: null, ...ran }
              : { result: s.result, issues: [], failure: outcome.failure, ...ran },
        );
      },
      first.current ? 0 : LIVE_DEBOUNCE_MS,
    );
    first.current = false;
    return () => clearTimeout(timer);
  }, [draft, teamPolicy]);
  // Pending while the answer on screen is for other inputs than the ones in the form.
  const pending = state.ranFor !== draft || state.ranPolicy !== teamPolicy;
  return { result: state.result, issues: state.issues, failure: state.failure, pending };
}
