/**
 * npx tsx sim/cli.ts check design.json [more.json ...] [--json] [--points N]
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

export interface CheckOptions {
  points?: number;
}

export interface CheckSuccess {
  file: string;
  metrics: Metrics;
  solvers: SolverReport;
  warnings: string[];
  checks: Check[];
  notices: Notice[];
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
    };
  } catch (error) {
    if (error instanceof DesignError) return errorOutput(path, error);
    throw error;
  }
}

const eng = (value: number | null, unit: string) => (value === null ? '—' : formatEng(value, unit));
const at = (e: { value: number; time: number }, unit: string) => `${formatEng(e.value, unit)} at ${formatEng(e.time, 's')}`;

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
  return lines.join('\n');
}

const USAGE = 'usage: npx tsx sim/cli.ts check design.json [more.json ...] [--json] [--points N]';

/** Runs the command; returns the exit status. */
export function main(
  argv: string[],
  write: (line: string) => void = (line) => process.stdout.write(`${line}\n`),
  writeError: (line: string) => void = (line) => process.stderr.write(`${line}\n`),
): number {
  const [command, ...rest] = argv;
  if (command !== 'check') {
    writeError(USAGE);
    return 2;
  }
  const files: string[] = [];
  let json = false;
  let points: number | undefined;
  for (let k = 0; k < rest.length; k++) {
    const arg = rest[k];
    if (arg === '--json') json = true;
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
  let status = 0;
  files.forEach((file, index) => {
    const output = checkDesignFile(file, { points });
    if (isFailure(output)) status = 2;
    else if (status === 0 && summariseChecks(output.checks).fail > 0) status = 1;
    if (json) write(JSON.stringify(output));
    else write((index > 0 ? '\n' : '') + formatSummary(output));
  });
  return status;
}

if (require.main === module) {
  process.exitCode = main(process.argv.slice(2));
}
