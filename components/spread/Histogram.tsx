import { scaleLinear } from 'd3-scale';
import { useState } from 'react';
import { View, type LayoutChangeEvent } from 'react-native';
import Svg, { G, Line, Rect, Text as SvgText } from 'react-native-svg';
import { Text } from '@/components/ui/Text';
import { useTheme } from '@/lib/theme';
import type { SpreadHistogram } from '@/sim/spread';
import { formatEng as eng } from '@/sim/units';

const formatEng = (v: number | null | undefined, unit: string) =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : eng(v, unit);

/** One metric's spread as 30 bins, with its rating (fail colour) and derated limit (warn colour) drawn. */
export function Histogram({ histogram, testID }: { histogram: SpreadHistogram; testID?: string }) {
  const theme = useTheme();
  const c = theme.color;
  const [width, setWidth] = useState(0);
  const height = 160;
  const pad = { l: 8, r: 8, t: 18, b: 30 };
  const bins = histogram.bins;
  const lo = Math.min(bins[0]?.from ?? 0, ...histogram.ratings.map((r) => r.deratedLimit ?? r.limit));
  const hi = Math.max(bins[bins.length - 1]?.to ?? 1, ...histogram.ratings.map((r) => r.limit));
  const span = hi - lo || Math.abs(hi) || 1;
  const x = scaleLinear().domain([lo - span * 0.02, hi + span * 0.02]).range([pad.l, Math.max(pad.l + 1, width - pad.r)]);
  const top = Math.max(1, ...bins.map((b) => b.count));
  const dataLeft = x(bins[0]?.from ?? lo);
  const dataRight = x(bins[bins.length - 1]?.to ?? hi);
  const y = scaleLinear().domain([0, top]).range([height - pad.b, pad.t]);
  const u = histogram.unit;
  const total = bins.reduce((s, b) => s + b.count, 0);
  const summary = `${histogram.label}: ${total} samples from ${formatEng(bins[0]?.from, u)} to ${formatEng(bins[bins.length - 1]?.to, u)}${histogram.ratings
    .map((r) => `; ${r.label} rating ${formatEng(r.limit, u)}`)
    .join('')}.`;
  return (
    <View
      onLayout={(e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width))}
      testID={testID}
      accessible
      accessibilityLabel={summary}
      style={{ gap: 4 }}
    >
      <Text weight="semibold">{histogram.label}</Text>
      {width > 0 ? (
        <Svg width={width} height={height}>
          <Line x1={pad.l} x2={width - pad.r} y1={height - pad.b} y2={height - pad.b} stroke={c.hairline} />
          {bins.map((b, k) =>
            b.count > 0 ? (
              <Rect
                key={k}
                x={x(b.from)}
                width={Math.max(1, x(b.to) - x(b.from) - 1)}
                y={y(b.count)}
                height={height - pad.b - y(b.count)}
                fill={c.accent}
                opacity={0.8}
              />
            ) : null,
          )}
          {histogram.ratings.map((r) => (
            <G key={r.checkId}>
              <Line x1={x(r.limit)} x2={x(r.limit)} y1={pad.t - 4} y2={height - pad.b} stroke={c.status.fail} strokeWidth={1.5} strokeDasharray="5 3" />
              {r.deratedLimit !== null ? (
                <Line
                  x1={x(r.deratedLimit)}
                  x2={x(r.deratedLimit)}
                  y1={pad.t - 4}
                  y2={height - pad.b}
                  stroke={c.status.warn}
                  strokeWidth={1.5}
                  strokeDasharray="2 3"
                />
              ) : null}
              <SvgText x={Math.min(x(r.limit), width - pad.r)} y={pad.t - 6} fontSize={10} fill={c.status.fail} textAnchor="end">
                {formatEng(r.limit, u)}
              </SvgText>
            </G>
          ))}
          {/* The samples' range, written under the bars themselves (the axis may run on to a rating). */}
          {dataRight - dataLeft < 110 ? (
            <SvgText
              x={dataLeft > width / 2 ? dataRight : dataLeft}
              y={height - 10}
              fontSize={11}
              fill={c.mutedInk}
              textAnchor={dataLeft > width / 2 ? 'end' : 'start'}
            >
              {`${formatEng(bins[0]?.from, u)} … ${formatEng(bins[bins.length - 1]?.to, u)}`}
            </SvgText>
          ) : (
            <>
              <SvgText x={dataLeft} y={height - 10} fontSize={11} fill={c.mutedInk}>
                {formatEng(bins[0]?.from, u)}
              </SvgText>
              <SvgText x={dataRight} y={height - 10} fontSize={11} fill={c.mutedInk} textAnchor="end">
                {formatEng(bins[bins.length - 1]?.to, u)}
              </SvgText>
            </>
          )}
        </Svg>
      ) : null}
      <Text variant="caption" muted>
        Nominal {formatEng(histogram.nominal, u)}
        {histogram.ratings.length ? ` · dashed: rating${histogram.ratings.some((r) => r.deratedLimit !== null) ? ' and derated limit' : ''}` : ''}
      </Text>
    </View>
  );
}
