import { View } from 'react-native';
import { Card } from '@/components/ui/Card';
import { Text } from '@/components/ui/Text';
import { useLayout, useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

type Metrics = Record<string, unknown>;

export function metricValue(m: Metrics, key: string): number | null {
  const raw = m[key];
  if (typeof raw === 'number') return Number.isFinite(raw) ? raw : null;
  if (raw && typeof raw === 'object' && typeof (raw as { value?: unknown }).value === 'number')
    return (raw as { value: number }).value;
  return null;
}

export function metricTime(m: Metrics, key: string): number | null {
  const raw = m[key];
  if (raw && typeof raw === 'object' && typeof (raw as { time?: unknown }).time === 'number')
    return (raw as { time: number }).time;
  return null;
}

const CLASS_WORD: Record<string, string> = {
  underdamped: 'underdamped',
  'critically-damped': 'critically damped',
  critical: 'critically damped',
  overdamped: 'overdamped',
  undamped: 'undamped',
  'first-order': 'first order (no inductance)',
};

interface Row {
  label: string;
  value: string;
  at?: string;
}

function rowsFor(m: Metrics): { peaks: Row[]; precharge: Row[]; damping: Row[] } {
  const eng = (key: string, unit: string, digits = 3) => {
    const v = metricValue(m, key);
    return v === null ? null : formatEng(v, unit, digits);
  };
  const at = (key: string) => {
    const t = metricTime(m, key);
    return t === null ? undefined : `at ${formatEng(t, 's')}`;
  };
  const peaks: Row[] = [];
  const push = (list: Row[], label: string, value: string | null, when?: string) => {
    if (value !== null) list.push({ label, value, at: when });
  };
  push(peaks, 'Peak capacitor voltage', eng('peakCapacitorVoltage', 'V'), at('peakCapacitorVoltage'));
  const vmin = metricValue(m, 'minCapacitorVoltage');
  if (vmin !== null && vmin < 0) push(peaks, 'Lowest capacitor voltage', formatEng(vmin, 'V'), at('minCapacitorVoltage'));
  push(peaks, 'Peak bus voltage', eng('peakBusVoltage', 'V'), at('peakBusVoltage'));
  push(peaks, 'Peak current', eng('peakCurrent', 'A'), at('peakCurrent'));
  push(peaks, 'I²t', eng('i2t', 'A²s'));
  const os = metricValue(m, 'overshootPercent');
  push(peaks, 'Overshoot', os === null ? null : `${os.toFixed(1)} %`);
  push(peaks, 'Steady-state voltage', eng('steadyStateVoltage', 'V'));
  push(peaks, 'Final capacitor voltage', eng('finalCapacitorVoltage', 'V'));
  push(peaks, 'Time to 95 %', eng('timeTo95', 's'));
  push(peaks, 'Stored energy at peak', eng('storedEnergyAtPeak', 'J'));

  const precharge: Row[] = [];
  const energy = metricValue(m, 'prechargeEnergy');
  if (energy !== null && energy > 0) {
    push(precharge, 'Precharge resistor energy', formatEng(energy, 'J'));
    push(precharge, 'Precharge resistor peak power', eng('prechargePeakPower', 'W'));
  }
  push(precharge, 'Bypass closes', eng('bypassTime', 's'));
  push(precharge, 'Step at bypass', eng('residualStep', 'V'));
  push(precharge, 'Peak current after bypass', eng('peakCurrentAfterBypass', 'A'));
  push(precharge, 'I²t after bypass', eng('i2tAfterBypass', 'A²s'));

  const damping: Row[] = [];
  const cls = typeof m.classification === 'string' ? m.classification : null;
  if (cls) damping.push({ label: 'Damping', value: CLASS_WORD[cls] ?? cls });
  push(damping, 'α', eng('alpha', 's⁻¹'));
  push(damping, 'ωn', eng('omegaN', 'rad/s'));
  push(damping, 'ωd', eng('omegaD', 'rad/s'));
  const zeta = metricValue(m, 'zeta');
  push(damping, 'ζ', zeta === null ? null : zeta.toPrecision(3));
  const q = metricValue(m, 'q');
  push(damping, 'Q', q === null ? null : q.toPrecision(3));
  return { peaks, precharge, damping };
}

/** The headline numbers of a check: peaks with their times, the precharge figures, the damping class. */
export function MetricsCard({ metrics, testID = 'metrics-card' }: { metrics: Metrics; testID?: string }) {
  const theme = useTheme();
  const layout = useLayout();
  const { peaks, precharge, damping } = rowsFor(metrics);
  const group = (title: string, rows: Row[]) =>
    rows.length ? (
      <View style={{ gap: 2, flexBasis: layout.isNarrow ? '100%' : 240, flexGrow: 1 }}>
        <Text variant="caption" weight="semibold" muted>
          {title}
        </Text>
        {rows.map((r) => (
          <View
            key={r.label}
            style={{
              flexDirection: 'row',
              justifyContent: 'space-between',
              gap: theme.space.s,
              paddingVertical: 3,
              borderBottomWidth: 1,
              borderBottomColor: theme.color.hairline,
            }}
            accessible
            accessibilityLabel={`${r.label}: ${r.value}${r.at ? ' ' + r.at : ''}`}
          >
            <Text style={{ flexShrink: 1 }}>{r.label}</Text>
            <Text mono align="right">
              {r.value}
              {r.at ? (
                <Text mono muted variant="caption">
                  {' '}
                  {r.at}
                </Text>
              ) : null}
            </Text>
          </View>
        ))}
      </View>
    ) : null;
  return (
    <Card title="Figures" testID={testID}>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.l }}>
        {group('Peaks', peaks)}
        {group('Precharge and bypass', precharge)}
        {group('Damping of the series path', damping)}
      </View>
    </Card>
  );
}
