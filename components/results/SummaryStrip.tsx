import { View } from 'react-native';
import { marginText, orderChecks, type CheckRow } from '@/components/checks/ChecksTable';
import { StatusBadge } from '@/components/ui/StatusBadge';
import { Text } from '@/components/ui/Text';
import { useTheme, type StatusKind } from '@/lib/theme';
import { formatEng } from '@/sim/units';
import { metricValue } from './MetricsCard';

export interface SummaryFigures {
  checks: CheckRow[];
  metrics: Record<string, unknown>;
}

export function worstOf(checks: CheckRow[]): StatusKind {
  if (checks.some((c) => c.status === 'fail')) return 'fail';
  if (checks.some((c) => c.status === 'warn')) return 'warn';
  if (checks.length === 0 || checks.every((c) => c.status === 'not-checked')) return 'not-checked';
  if (checks.some((c) => c.status === 'not-checked')) return 'not-checked';
  return 'pass';
}

/**
 * The answer before the details: worst margin, overall status, peak capacitor voltage and peak
 * current. Sits at the top of a design and stays there while the page scrolls.
 */
export function SummaryStrip({
  figures,
  stale,
  testID = 'summary-strip',
}: {
  figures: SummaryFigures | null;
  stale?: string | null;
  testID?: string;
}) {
  const theme = useTheme();
  const checked = figures ? orderChecks(figures.checks).filter((c) => c.marginPercent !== null) : [];
  const worst = checked[0] ?? null;
  const status = figures ? worstOf(figures.checks) : 'not-checked';
  const vpk = figures ? metricValue(figures.metrics, 'peakCapacitorVoltage') : null;
  const ipk = figures ? metricValue(figures.metrics, 'peakCurrent') : null;
  const cell = (label: string, value: string, id: string, colour?: string) => (
    <View
      style={{ minWidth: 72, flexGrow: 1, flexBasis: 0 }}
      testID={`${testID}-${id}`}
      accessible
      accessibilityLabel={`${label}: ${value}`}
    >
      <Text variant="caption" muted numberOfLines={1}>
        {label}
      </Text>
      <Text mono weight="semibold" color={colour} numberOfLines={1}>
        {value}
      </Text>
    </View>
  );
  return (
    <View
      testID={testID}
      style={{
        backgroundColor: theme.color.card,
        borderBottomWidth: 1,
        borderBottomColor: theme.color.hairline,
        paddingHorizontal: theme.space.l,
        paddingVertical: theme.space.s,
        gap: 4,
      }}
    >
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: theme.space.m }}>
        <View style={{ minWidth: 84 }} testID={`${testID}-status`}>
          <Text variant="caption" muted>
            Status
          </Text>
          <StatusBadge status={status} />
        </View>
        {cell(
          'Worst margin',
          worst ? marginText(worst.marginPercent) : '—',
          'margin',
          worst && (worst.status === 'fail' || worst.status === 'warn') ? theme.color.status[worst.status] : undefined,
        )}
        {cell('Peak vC', vpk === null ? '—' : formatEng(vpk, 'V'), 'vc')}
        {cell('Peak i', ipk === null ? '—' : formatEng(ipk, 'A'), 'i')}
      </View>
      {worst ? (
        <Text variant="caption" muted numberOfLines={1}>
          Worst: {worst.label}
        </Text>
      ) : null}
      {stale ? (
        <Text variant="caption" color={theme.color.status.warn} numberOfLines={2}>
          {stale}
        </Text>
      ) : null}
    </View>
  );
}
