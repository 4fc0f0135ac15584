/**
 * npx tsx sim/cli.ts check design.json [more.json ...] [--json] [--points N]
 *   [--spread corners|monte-carlo [--samples N] [--seed S]] [--stability]
 *
 * --spread runs the tolerance spread over the design file's `tolerances` section and --stability the
 * input-filter stability (constant-power load); each adds an object of that name to the output
 * ({ error: { message, issues } } when it cannot run on that design; a spread whose worst case
 * fails counts as a failed check for the exit status).
 *
 * Checks each design file in the order given and prints a readable summary per file, or with
 * --json one JSON object per file per line: { file, metrics, solvers, warnings, checks, notices }
 * or { file, error: { message, issues } } for a file that is not a valid design.
 * Exit status: 2 when any input was invalid (a file or the arguments), else 1 when any rating
 * check failed (warnings do not fail), else 0 — so a hardware team can gate a pipeline on it.
 */
import { readFileSync } from 'node:fs';

import { DesignError, type DesignIssue } from './errors';
import { MAX_POINTS, parseDesign } from './design';
import type { Metrics } from './metrics';
import { simulate, type SimulationResult, type SolverReport } from './simulate';
import { formatEng } from './units';
import { evaluateChecks, resolvePolicy, summariseChecks, type Check } from './ratings';
import { buildNotices, type Notice } from './notices';
import { runSpread, type SpreadResult } from './spread';
import { MAX_SAMPLES } from './spread/sampling';
import { analyseStability, type StabilityResult } from './stability';
import { engineDesignOf, mainsChecks, parseMainsDesign, simulateMains, type MainsMetrics } from './mains';

export interface CheckOptions {
  points?: number;
  stability?: boolean;
}

export interface SpreadCliOptions {
  method: 'corners' | 'monte-carlo';
  samples?: number;
  seed?: number;
}

type Failed = { error: { message: string; issues: DesignIssue[] } };

export interface CheckSuccess {
  file: string;
  metrics: Metrics;
  solvers: SolverReport;
  warnings: string[];
  checks: Check[];
  notices: Notice[];
  stability?: StabilityResult | Failed;
  spread?: SpreadResult | Failed;
}

export interface CheckFailure {
  file: string;
  error: { message: string; issues: DesignIssue[] };
}

export type CheckOutput = CheckSuccess | CheckFailure;

export function isFailure(output: CheckOutput): output is CheckFailure {
  return 'error' in output;
}

function errorOutput(file: string, error: unknown): CheckOutput {
  if (error instanceof DesignError) return { file, error: { message: error.message, issues: error.issues } };
  const message = error instanceof Error ? error.message : String(error);
  return { file, error: { message, issues: [{ path: '', message }] } };
}

/** The per-file work of `check`: read, validate, simulate, shape the JSON object. */
export function checkDesignFile(path: string, options: CheckOptions = {}): CheckOutput {
  let input: unknown;
  try {
    input = JSON.parse(readFileSync(path, 'utf8'));
  } catch (error) {
    const reason = error instanceof SyntaxError ? `is not valid JSON (${error.message})` : 'cannot be read';
    return { file: path, error: { message: `${path} ${reason}`, issues: [{ path: '', message: `the file ${reason}` }] } };
  }
  // A mains design (bridge rectifier from the AC mains, sim/mains) is one with a `mains` section.
  if (input !== null && typeof input === 'object' && !Array.isArray(input) && 'mains' in input) {
    try {
      const mains = parseMainsDesign(input);
      const result = simulateMains(mains, { points: options.points });
      const policy = resolvePolicy(undefined, mains.derating);
      return {
        file: path,
        metrics: result.metrics as unknown as Metrics,
        solvers: result.solvers as unknown as SolverReport,
        warnings: result.warnings,
        checks: mainsChecks(mains, result, policy),
        notices: buildNotices(engineDesignOf(mains), result as never, policy.discharge),
      };
    } catch (error) {
      if (error instanceof DesignError) return errorOutput(path, error);
      throw error;
    }
  }
  try {
    const design = parseDesign(input);
    const result: SimulationResult = simulate(design, { points: options.points });
    const policy = resolvePolicy(undefined, design.derating);
    return {
      file: path,
      metrics: result.metrics,
      solvers: result.solvers,
      warnings: result.warnings,
      checks: evaluateChecks(design, result.metrics, policy),
      notices: buildNotices(design, result, policy.discharge),
      ...(options.stability ? { stability: stabilityOf(design) } : {}),
    };
  } catch (error) {
    if (error instanceof DesignError) return errorOutput(path, error);
    throw error;
  }
}

function failed(error: unknown): Failed {
  if (error instanceof DesignError) return { error: { message: error.message, issues: error.issues } };
  throw error;
}

function stabilityOf(design: ReturnType<typeof parseDesign>): StabilityResult | Failed {
  try {
    return analyseStability(design);
  } catch (error) {
    return failed(error);
  }
}

/** The spread of a design file over its own `tolerances` section. */
export async function spreadOfFile(path: string, options: SpreadCliOptions): Promise<SpreadResult | Failed> {
  try {
    const input: unknown = JSON.parse(readFileSync(path, 'utf8'));
    const isMains = input !== null && typeof input === 'object' && !Array.isArray(input) && 'mains' in input;
    const design = isMains ? parseMainsDesign(input) : parseDesign(input);
    if (!design.tolerances || Object.keys(design.tolerances).length === 0)
      throw new DesignError('the design has no tolerances section to spread', 'tolerances');
    return await runSpread(design, design.tolerances, { ...options, policy: resolvePolicy(undefined, design.derating) });
  } catch (error) {
    return failed(error);
  }
}

const eng = (value: number | null, unit: string) => (value === null ? '—' : formatEng(value, unit));
const at = (e: { value: number; time: number }, unit: string) => `${formatEng(e.value, unit)} at ${formatEng(e.time, 's')}`;

/** The readable summary of a mains design's check. */
function formatMainsSummary(output: CheckSuccess, m: MainsMetrics): string {
  const lines = [
    `${output.file}  (mains power-up)`,
    `  peak inrush             ${at(m.peakCurrent, 'A')}`,
    `  line I²t (fuse)         ${formatEng(m.i2t, 'A²s')}`,
    `  worst diode             I²t ${formatEng(m.diodeI2t, 'A²s')}; surge equivalent ${formatEng(m.surgeEquivalentCurrent, 'A')} (the ${formatEng(m.surgePulseDuration, 's')} half-sine with the worst pulse's I²t, to compare with IFSM)`,
    `  limiter                 ${formatEng(m.limiterEnergy, 'J')}` + (m.limiterPeakPower ? `, peak ${at(m.limiterPeakPower, 'W')}` : ''),
    `  peak capacitor voltage  ${at(m.peakCapacitorVoltage, 'V')}; final ${formatEng(m.finalCapacitorVoltage, 'V')}`,
  ];
  const s = output.solvers;
  lines.push(`  solvers                 ${s.ran.join(', ')}; waveform from ${s.waveformFrom}`);
  for (const k of s.skipped) lines.push(`                          ${k.solver} skipped (${k.reason})`);
  for (const warning of output.warnings) lines.push(`  warning: ${warning}`);
  if (output.checks.length > 0) {
    const summary = summariseChecks(output.checks);
    lines.push(`  margins                 ${summary.fail} fail, ${summary.warn} warn, ${summary.pass} pass, ${summary.notChecked} not checked`);
    for (const check of output.checks) lines.push(`    [${check.status}] ${check.label}: ${check.message}`);
  }
  return lines.join('\n');
}

/** The readable summary of one file. */
export function formatSummary(output: CheckOutput): string {
  if (isFailure(output)) {
    return [
      `${output.file}: not a valid design`,
      ...output.error.issues.map((i) => `  ${i.path || '(file)'}: ${i.message}`),
    ].join('\n');
  }
  const m = output.metrics;
  const s = output.solvers;
  if ('surgeEquivalentCurrent' in m)
    return [formatMainsSummary(output, m as unknown as MainsMetrics), ...analysisLines(output)].join('\n');
  const lines = [
    `${output.file}`,
    `  peak capacitor voltage  ${at(m.peakCapacitorVoltage, 'V')}`,
    `  min capacitor voltage   ${at(m.minCapacitorVoltage, 'V')}`,
    `  peak bus voltage        ${at(m.peakBusVoltage, 'V')}`,
    `  peak current            ${at(m.peakCurrent, 'A')}`,
    `  I²t                     ${formatEng(m.i2t, 'A²s')}`,
  ];
  if (m.prechargePhase) {
    lines.push(`  precharge resistor      ${formatEng(m.prechargeEnergy, 'J')}, peak ${formatEng(m.prechargePeakPower, 'W')}`);
    lines.push(
      m.bypassTime === null
        ? '  bypass                  does not close within the run'
        : `  bypass                  closes at ${formatEng(m.bypassTime, 's')}, residual step ${eng(m.residualStep, 'V')}, then peak ${eng(m.peakCurrentAfterBypass, 'A')} and ${eng(m.i2tAfterBypass, 'A²s')}`,
    );
  }
  lines.push(
    `  final capacitor voltage ${formatEng(m.finalCapacitorVoltage, 'V')} (steady state ${formatEng(m.steadyStateVoltage, 'V')}` +
      (m.overshootPercent === null ? ')' : `, overshoot ${formatEng(m.overshootPercent, '%')})`),
  );
  const series = (c: { classification: string; zeta: number | null; omegaN: number | null }) =>
    c.zeta === null
      ? c.classification
      : `${c.classification}, ζ ${Number(c.zeta.toPrecision(3))}, ωn ${formatEng(c.omegaN ?? 0, 'rad/s')}`;
  lines.push(
    `  series path             ${series(m)}` +
      (m.prechargePhase ? `; with the precharge resistor in: ${series(m.prechargePhase)}` : ''),
  );
  lines.push(
    `  time to settle          ${eng(m.timeTo95, 's')}; stored energy at the peak ${formatEng(m.storedEnergyAtPeak, 'J')}`,
  );
  const skipped = s.skipped.map((k) => `${k.solver} skipped (${k.reason})`);
  lines.push(
    `  solvers                 ${s.ran.join(', ')}; waveform from ${s.waveformFrom}; largest disagreement ${s.maxDisagreement.vC.toExponential(1)} on vC, ${s.maxDisagreement.i.toExponential(1)} on i`,
  );
  for (const note of skipped) lines.push(`                          ${note}`);
  for (const warning of output.warnings) lines.push(`  warning: ${warning}`);
  if (output.checks.length > 0) {
    const summary = summariseChecks(output.checks);
    lines.push(`  margins                 ${summary.fail} fail, ${summary.warn} warn, ${summary.pass} pass, ${summary.notChecked} not checked`);
    for (const check of output.checks) lines.push(`    [${check.status}] ${check.label}: ${check.message}`);
  }
  for (const notice of output.notices) lines.push(`  ${notice.title.toUpperCase()}: ${notice.text}`);
  lines.push(...analysisLines(output));
  return lines.join('\n');
}

/** The stability and spread lines of the readable summary (DC and mains designs alike). */
function analysisLines(output: CheckSuccess): string[] {
  const lines: string[] = [];
  if (output.stability)
    lines.push(
      'error' in output.stability
        ? `  stability               cannot run: ${output.stability.error.message}`
        : `  stability               ${output.stability.verdict}`,
    );
  if (output.spread) {
    const sp = output.spread;
    if ('error' in sp) lines.push(`  spread                  cannot run: ${sp.error.message}`);
    else if (sp.status === 'complete')
      lines.push(
        `  spread                  ${sp.method}, ${sp.samples} samples${sp.seed !== null ? `, seed ${sp.seed}` : ''}: worst ${sp.worstStatus}` +
          (sp.worstCase ? `, ${sp.worstCase.label} margin ${sp.worstCase.marginPercent.toFixed(1)} %` : ''),
      );
  }
  return lines;
}

const USAGE =
  'usage: npx tsx sim/cli.ts check design.json [more.json ...] [--json] [--points N] [--spread corners|monte-carlo [--samples N] [--seed S]] [--stability]';

/** Runs the command; returns the exit status. */
export function main(
  argv: string[],
  write: (line: string) => void = (line) => process.stdout.write(`${line}\n`),
  writeError: (line: string) => void = (line) => process.stderr.write(`${line}\n`),
): number | Promise<number> {
  const [command, ...rest] = argv;
  if (command !== 'check') {
    writeError(USAGE);
    return 2;
  }
  const files: string[] = [];
  let json = false;
  let points: number | undefined;
  let stability = false;
  let spread: SpreadCliOptions | null = null;
  let samples: number | undefined;
  let seed: number | undefined;
  const valueOf = (arg: string, k: number) => (arg.includes('=') ? arg.slice(arg.indexOf('=') + 1) : rest[k + 1]);
  for (let k = 0; k < rest.length; k++) {
    const arg = rest[k];
    if (arg === '--json') json = true;
    else if (arg === '--stability') stability = true;
    else if (arg === '--spread' || arg.startsWith('--spread=')) {
      const text = valueOf(arg, k);
      if (!arg.includes('=')) k++;
      if (text !== 'corners' && text !== 'monte-carlo') {
        writeError(`--spread must be corners or monte-carlo, got ${text ?? 'nothing'}`);
        return 2;
      }
      spread = { method: text };
    } else if (arg === '--samples' || arg.startsWith('--samples=') || arg === '--seed' || arg.startsWith('--seed=')) {
      const isSeed = arg.startsWith('--seed');
      const text = valueOf(arg, k);
      if (!arg.includes('=')) k++;
      const value = Number(text);
      const max = isSeed ? 0xffffffff : MAX_SAMPLES;
      if (!Number.isInteger(value) || value < (isSeed ? 0 : 1) || value > max) {
        writeError(`${isSeed ? '--seed' : '--samples'} must be a whole number from ${isSeed ? 0 : 1} to ${max}, got ${text ?? 'nothing'}`);
        return 2;
      }
      if (isSeed) seed = value;
      else samples = value;
    }
    else if (arg === '--points' || arg.startsWith('--points=')) {
      const text = arg.includes('=') ? arg.slice(arg.indexOf('=') + 1) : rest[++k];
      const value = Number(text);
      if (!Number.isInteger(value) || value < 2 || value > MAX_POINTS) {
        writeError(`--points must be a whole number from 2 to ${MAX_POINTS}, got ${text ?? 'nothing'}`);
        return 2;
      }
      points = value;
    } else if (arg.startsWith('--')) {
      writeError(`unknown option ${arg}\n${USAGE}`);
      return 2;
    } else files.push(arg);
  }
  if (files.length === 0) {
    writeError(USAGE);
    return 2;
  }
  if ((samples !== undefined || seed !== undefined) && spread?.method !== 'monte-carlo') {
    writeError(`--samples and --seed go with --spread monte-carlo\n${USAGE}`);
    return 2;
  }
  if (spread) {
    const spreadOptions: SpreadCliOptions = { ...spread, ...(samples !== undefined ? { samples } : {}), ...(seed !== undefined ? { seed } : {}) };
    return (async () => {
      let status = 0;
      for (const [index, file] of files.entries()) {
        const output = checkDesignFile(file, { points, stability });
        if (!isFailure(output)) output.spread = await spreadOfFile(file, spreadOptions);
        status = Math.max(status, statusOf(output));
        if (json) write(JSON.stringify(output));
        else write((index > 0 ? '\n' : '') + formatSummary(output));
      }
      return status;
    })();
  }
  let status = 0;
  files.forEach((file, index) => {
    const output = checkDesignFile(file, { points, stability });
    if (isFailure(output)) status = 2;
    else if (status === 0 && summariseChecks(output.checks).fail > 0) status = 1;
    if (json) write(JSON.stringify(output));
    else write((index > 0 ? '\n' : '') + formatSummary(output));
  });
  return status;
}

/** 2 for invalid input (the file, or a spread that cannot run), 1 for a failed check, else 0. */
function statusOf(output: CheckOutput): number {
  if (isFailure(output)) return 2;
  if (output.spread && 'error' in output.spread) return 2;
  if (summariseChecks(output.checks).fail > 0) return 1;
  if (output.spread && output.spread.status === 'complete' && output.spread.worstStatus === 'fail') return 1;
  return 0;
}

if (require.main === module) {
  void Promise.resolve(main(process.argv.slice(2))).then((code) => (process.exitCode = code));
}
