import type { ReactNode } from 'react';
import { ScrollView, View } from 'react-native';
import { StatusBadge } from '@/components/ui/StatusBadge';
import { Text } from '@/components/ui/Text';
import { checkStatusOrder, type CheckResult } from '@/lib/contracts';
import { useLayout, useTheme, type StatusKind } from '@/lib/theme';
import { formatEng } from '@/sim/units';

/** What the table needs of a check: the engine's Check or the API's stored copy. */
export type CheckRow = Pick<
  CheckResult,
  'id' | 'label' | 'value' | 'limit' | 'deratedLimit' | 'marginPercent' | 'status' | 'basis' | 'unit' | 'message'
>;

/** Failures first, then warnings, not checked, passes; within a status the smallest margin first. */
export function orderChecks<T extends CheckRow>(checks: T[]): T[] {
  return [...checks].sort((a, b) => {
    const s = checkStatusOrder[a.status] - checkStatusOrder[b.status];
    if (s !== 0) return s;
    const ma = a.marginPercent ?? Infinity;
    const mb = b.marginPercent ?? Infinity;
    return ma - mb;
  });
}

export function quantityText(value: number | null, unit: string): string {
  if (value === null || !Number.isFinite(value)) return '—';
  return formatEng(value, unit);
}

export function marginText(margin: number | null): string {
  if (margin === null || !Number.isFinite(margin)) return '—';
  const rounded = Math.abs(margin) >= 100 ? margin.toFixed(0) : margin.toFixed(1);
  return `${margin > 0 ? '+' : margin < 0 ? '−' : ''}${rounded.replace('-', '')} %`;
}

export interface ChecksTableProps {
  checks: CheckRow[];
  /** Extra content under a check (the reviewer's comments). */
  renderDetail?: (check: CheckRow) => ReactNode;
  testID?: string;
  /** Force a layout (tests, print); by default it follows the window. */
  layout?: 'table' | 'list';
}

const COLUMNS = [
  { key: 'label', title: 'Check', width: 220, align: 'left' as const },
  { key: 'value', title: 'Value', width: 104, align: 'right' as const },
  { key: 'limit', title: 'Rating', width: 104, align: 'right' as const },
  { key: 'derated', title: 'Derated limit', width: 112, align: 'right' as const },
  { key: 'margin', title: 'Margin', width: 88, align: 'right' as const },
  { key: 'status', title: 'Status', width: 124, align: 'left' as const },
];

/**
 * Each margin as a row: value, rating, derated limit, margin and status (icon and word). Failures
 * come first. Wide screens get every column; phones get one block per check.
 */
export function ChecksTable({ checks, renderDetail, testID = 'checks-table', layout }: ChecksTableProps) {
  const theme = useTheme();
  const windowLayout = useLayout();
  const mode = layout ?? (windowLayout.isNarrow ? 'list' : 'table');
  const rows = orderChecks(checks);
  const counts = rows.reduce<Record<StatusKind, number>>((acc, c) => ({ ...acc, [c.status]: acc[c.status] + 1 }), {
    fail: 0,
    warn: 0,
    'not-checked': 0,
    pass: 0,
  });
  const summary = `${rows.length} checks: ${counts.fail} fail, ${counts.warn} warn, ${counts['not-checked']} not checked, ${counts.pass} pass.`;

  if (rows.length === 0) {
    return (
      <Text muted testID={testID}>
        No ratings are entered, so nothing is checked yet. Add ratings under Ratings to see margins.
      </Text>
    );
  }

  if (mode === 'list') {
    return (
      <View testID={testID} accessibilityLabel={summary} style={{ gap: theme.space.s }}>
        {rows.map((c) => (
          <View
            key={c.id}
            testID={`check-${c.id}`}
            accessibilityLabel={`${c.label}: ${c.status === 'not-checked' ? 'not checked' : c.status}. Value ${quantityText(c.value, c.unit)}, derated limit ${quantityText(c.deratedLimit, c.unit)}, margin ${marginText(c.marginPercent)}.`}
            style={{
              borderWidth: 1,
              borderColor: theme.color.hairline,
              borderLeftWidth: 4,
              borderLeftColor: theme.color.status[c.status],
              borderRadius: theme.radius,
              padding: theme.space.m,
              gap: 4,
              backgroundColor: theme.color.card,
            }}
          >
            <View style={{ flexDirection: 'row', justifyContent: 'space-between', gap: theme.space.s, alignItems: 'flex-start' }}>
              <Text weight="semibold" style={{ flexShrink: 1 }}>
                {c.label}
              </Text>
              <StatusBadge status={c.status} testID={`check-${c.id}-status`} />
            </View>
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', columnGap: theme.space.l, rowGap: 2 }}>
              <Pair label="Value" value={quantityText(c.value, c.unit)} />
              <Pair label="Derated limit" value={quantityText(c.deratedLimit, c.unit)} />
              <Pair label="Margin" value={marginText(c.marginPercent)} />
            </View>
            {c.message ? (
              <Text variant="caption" muted>
                {c.message}
              </Text>
            ) : null}
            {renderDetail?.(c)}
          </View>
        ))}
      </View>
    );
  }

  const cell = { paddingVertical: theme.space.s, paddingHorizontal: theme.space.s };
  return (
    <ScrollView horizontal testID={testID} accessibilityLabel={summary} contentContainerStyle={{ minWidth: '100%' }}>
      <View role="table" accessibilityLabel="Checks" style={{ flex: 1 }}>
        <View role="row" style={{ flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: theme.color.hairline }}>
          {COLUMNS.map((col) => (
            <View key={col.key} role="columnheader" style={[cell, { width: col.width, flexGrow: col.key === 'label' ? 1 : 0 }]}>
              <Text variant="caption" weight="semibold" muted align={col.align}>
                {col.title}
              </Text>
            </View>
          ))}
        </View>
        {rows.map((c) => (
          <View key={c.id} testID={`check-${c.id}`} style={{ borderBottomWidth: 1, borderBottomColor: theme.color.hairline }}>
            <View role="row" style={{ flexDirection: 'row', alignItems: 'flex-start' }}>
              <View role="cell" style={[cell, { width: COLUMNS[0].width, flexGrow: 1 }]}>
                <Text weight="semibold">{c.label}</Text>
                {c.message ? (
                  <Text variant="caption" muted>
                    {c.message}
                  </Text>
                ) : null}
                {c.basis ? (
                  <Text variant="caption" muted>
                    Basis: {c.basis}
                  </Text>
                ) : null}
              </View>
              <NumCell width={COLUMNS[1].width} text={quantityText(c.value, c.unit)} />
              <NumCell width={COLUMNS[2].width} text={quantityText(c.limit, c.unit)} />
              <NumCell width={COLUMNS[3].width} text={quantityText(c.deratedLimit, c.unit)} />
              <NumCell
                width={COLUMNS[4].width}
                text={marginText(c.marginPercent)}
                color={c.status === 'fail' || c.status === 'warn' ? theme.color.status[c.status] : undefined}
              />
              <View role="cell" style={[cell, { width: COLUMNS[5].width }]}>
                <StatusBadge status={c.status} testID={`check-${c.id}-status`} />
              </View>
            </View>
            {renderDetail ? (
              <View style={{ paddingHorizontal: theme.space.s, paddingBottom: theme.space.s }}>{renderDetail(c)}</View>
            ) : null}
          </View>
        ))}
      </View>
    </ScrollView>
  );
}

function NumCell({ width, text, color }: { width: number; text: string; color?: string }) {
  const theme = useTheme();
  return (
    <View role="cell" style={{ width, paddingVertical: theme.space.s, paddingHorizontal: theme.space.s }}>
      <Text mono align="right" color={color}>
        {text}
      </Text>
    </View>
  );
}

function Pair({ label, value }: { label: string; value: string }) {
  return (
    <Text variant="caption" muted>
      {label}{' '}
      <Text variant="caption" mono>
        {value}
      </Text>
    </Text>
  );
}
