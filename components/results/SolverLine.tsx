import { View } from 'react-native';
import { Icon } from '@/components/ui/Icon';
import { Text } from '@/components/ui/Text';
import { useTheme } from '@/lib/theme';
import { DISAGREEMENT_WARNING } from '@/sim';

const SOLVER_NAME: Record<string, string> = {
  closedForm: 'closed form',
  'closed-form': 'closed form',
  exact: 'exact linear stepping',
  linear: 'exact linear stepping',
  expm: 'exact linear stepping',
  odex: 'odex',
};

const name = (s: string) => SOLVER_NAME[s] ?? s;

/** Agreement within the engine's own warning level (relative to each trace's peak) reads as "agree". */
export const AGREEMENT_TOLERANCE = DISAGREEMENT_WARNING;

function pct(x: number): string {
  const p = x * 100;
  return p < 1e-6 ? '< 0.000001 %' : `${p < 0.1 ? String(Number(p.toPrecision(2))) : p.toFixed(2)} %`;
}

/**
 * One line on how the answer was reached: which solvers ran, which drew the waveform, and how far
 * apart they were, so that a reviewer can see it was cross-checked.
 */
export function SolverLine({
  solvers,
  elapsedMs,
  testID = 'solver-line',
}: {
  solvers: unknown;
  elapsedMs?: number;
  testID?: string;
}) {
  const theme = useTheme();
  const s = (solvers ?? {}) as {
    ran?: unknown;
    waveformFrom?: unknown;
    stiff?: unknown;
    maxDisagreement?: { vC?: unknown; i?: unknown } | null;
    skipped?: { solver: string; reason: string }[];
  };
  const ran = Array.isArray(s.ran) ? s.ran.map(String) : [];
  const from = typeof s.waveformFrom === 'string' ? s.waveformFrom : null;
  const dv = typeof s.maxDisagreement?.vC === 'number' ? s.maxDisagreement.vC : null;
  const di = typeof s.maxDisagreement?.i === 'number' ? s.maxDisagreement.i : null;
  const agree = dv !== null && di !== null && dv <= AGREEMENT_TOLERANCE && di <= AGREEMENT_TOLERANCE;
  let text: string;
  if (ran.length >= 2 && dv !== null && di !== null) {
    text = `${ran.map(name).join(' and ')} ${agree ? 'agree' : 'differ'}: largest difference ${pct(dv)} in vC, ${pct(di)} in i.`;
  } else if (ran.length === 1) {
    text = `Solved by ${name(ran[0])} only${s.stiff ? ' (a stiff phase, where the explicit solver is not used)' : ''}; no cross-check on this run.`;
  } else {
    text = 'Solver details are not available for this run.';
  }
  if (ran.length === 1 && Array.isArray(s.skipped) && s.skipped[0]?.reason)
    text += ` ${name(s.skipped[0].solver)} skipped: ${s.skipped[0].reason}.`;
  if (from) text += ` Waveform from ${name(from)}.`;
  if (elapsedMs !== undefined) text += ` Checked in the browser in ${Math.max(1, Math.round(elapsedMs))} ms.`;
  const tone = ran.length >= 2 && dv !== null ? (agree ? 'pass' : 'warn') : 'not-checked';
  return (
    <View testID={testID} style={{ flexDirection: 'row', gap: theme.space.s, alignItems: 'flex-start' }}>
      <Icon name={tone} size={16} color={theme.color.status[tone]} />
      <Text variant="caption" muted style={{ flex: 1 }}>
        {text}
      </Text>
    </View>
  );
}
