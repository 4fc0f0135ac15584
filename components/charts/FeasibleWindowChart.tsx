import { scaleLinear, scaleLog } from 'd3-scale';
import { line as d3line } from 'd3-shape';
import { useState } from 'react';
import { View } from 'react-native';
import Svg, { Circle, G, Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import { Text } from '@/components/ui/Text';
import type { PrechargeSizing } from '@/lib/queries/precharge';
import { useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

export interface WindowInputs {
  maxInrushCurrent: number;
  maxPrechargeTime: number;
  bypassThreshold: number;
  contactorDelay: number;
}

const M = { left: 60, right: 14, top: 10, bottom: 8, axis: 24 };

/**
 * The feasible resistance window: peak inrush (falls as 1/R) against the current limit, and the
 * time to close the bypass (grows with R) against the time limit, on one logarithmic R axis. The
 * curves are first order; the dots are the engine's re-simulated figures for each standard value.
 */
export function FeasibleWindowChart({
  result,
  inputs,
  testID = 'feasible-window-chart',
}: {
  result: PrechargeSizing;
  inputs: WindowInputs;
  testID?: string;
}) {
  const theme = useTheme();
  const [width, setWidth] = useState(0);
  const vmax = result.corners.busVoltage.max;
  const cmax = result.corners.capacitance.max;
  const k = inputs.bypassThreshold;
  const rmin = result.limits.current.minResistance;
  const rmax = result.limits.time.maxResistance;
  const rs = [rmin, rmax ?? rmin * 10, ...result.candidates.map((c) => c.resistance)].filter((r) => r > 0 && Number.isFinite(r));
  const lo = Math.min(...rs) / 3;
  const hi = Math.max(...rs) * 3;
  const panelH = Math.round(Math.min(170, Math.max(120, width * 0.28)));
  const x = scaleLog()
    .domain([lo, hi])
    .range([M.left, Math.max(M.left + 10, width - M.right)]);
  const samples = Array.from({ length: 80 }, (_, n) => lo * (hi / lo) ** (n / 79));
  const iOf = (r: number) => vmax / r;
  const tOf = (r: number) => r * cmax * Math.log(1 / (1 - k)) + inputs.contactorDelay;
  const iTop = Math.max(inputs.maxInrushCurrent * 1.6, ...result.candidates.map((c) => c.simulated?.peakCurrent ?? 0));
  const tTop = Math.max(inputs.maxPrechargeTime * 1.6, ...result.candidates.map((c) => c.simulated?.prechargeTime ?? 0));
  const yI = scaleLinear()
    .domain([0, iTop])
    .nice(4)
    .range([M.top + panelH - M.top - M.bottom, M.top]);
  const yT = scaleLinear()
    .domain([0, tTop])
    .nice(4)
    .range([M.top + panelH - M.top - M.bottom, M.top]);
  const clampI = (v: number) => Math.min(v, yI.domain()[1]);
  const clampT = (v: number) => Math.min(v, yT.domain()[1]);
  const pathOf = (f: (r: number) => number, y: (v: number) => number) =>
    d3line<number>()
      .x((r) => x(r))
      .y((r) => y(f(r)))(samples) ?? '';

  const winLo = result.window ? x(Math.max(lo, result.window.min)) : null;
  const winHi = result.window ? x(Math.min(hi, result.window.max)) : null;
  const font = { fontFamily: theme.fonts.mono, fontSize: 11 };
  const summary = result.window
    ? `Feasible window from ${formatEng(result.window.min, 'Ω')} (current limit ${formatEng(inputs.maxInrushCurrent, 'A')}) to ${formatEng(result.window.max, 'Ω')} (time limit ${formatEng(inputs.maxPrechargeTime, 's')}).`
    : `No resistance meets both limits: the current limit needs at least ${formatEng(rmin, 'Ω')}${rmax !== null ? `, the time limit allows at most ${formatEng(rmax, 'Ω')}` : ''}.`;

  const panel = (top: number, kind: 'current' | 'time', showAxis: boolean) => {
    const y = kind === 'current' ? yI : yT;
    const limit = kind === 'current' ? inputs.maxInrushCurrent : inputs.maxPrechargeTime;
    const unit = kind === 'current' ? 'A' : 's';
    const colour = kind === 'current' ? theme.color.trace.current : theme.color.trace.capacitorVoltage;
    const [x0, x1] = x.range();
    const [yb, yt] = y.range();
    return (
      <G y={top} key={kind}>
        <Rect x={x0} y={yt} width={x1 - x0} height={yb - yt} fill={theme.color.card} stroke={theme.color.hairline} />
        {winLo !== null && winHi !== null && winHi > winLo ? (
          <Rect x={winLo} y={yt} width={winHi - winLo} height={yb - yt} fill={theme.color.statusSoft.pass} />
        ) : null}
        {y.ticks(3).map((v) => (
          <G key={v}>
            <Line x1={x0} x2={x1} y1={y(v)} y2={y(v)} stroke={theme.color.hairline} />
            <SvgText x={x0 - 6} y={y(v) + 4} textAnchor="end" fill={theme.color.mutedInk} {...font}>
              {formatEng(v, unit)}
            </SvgText>
          </G>
        ))}
        <Line
          x1={x0}
          x2={x1}
          y1={y(limit)}
          y2={y(limit)}
          stroke={theme.color.status.fail}
          strokeWidth={1.5}
          strokeDasharray="6 4"
        />
        <SvgText x={x1 - 4} y={y(limit) - 4} textAnchor="end" fill={theme.color.status.fail} {...font}>
          {kind === 'current' ? `current limit ${formatEng(limit, 'A')}` : `time limit ${formatEng(limit, 's')}`}
        </SvgText>
        <Path
          d={pathOf((r) => (kind === 'current' ? clampI(iOf(r)) : clampT(tOf(r))), y)}
          stroke={colour}
          strokeWidth={2}
          fill="none"
        />
        {result.candidates.map((c) => {
          const v = kind === 'current' ? c.simulated?.peakCurrent : c.simulated?.prechargeTime;
          if (v === undefined || v === null) return null;
          const recommended = c.resistance === result.recommended;
          return (
            <Circle
              key={c.resistance}
              cx={x(c.resistance)}
              cy={y(kind === 'current' ? clampI(v) : clampT(v))}
              r={recommended ? 5 : 3.5}
              fill={recommended ? colour : theme.color.card}
              stroke={colour}
              strokeWidth={2}
            />
          );
        })}
        <SvgText x={x0 + 6} y={yt + 14} fill={theme.color.ink} fontFamily={theme.fonts.semibold} fontSize={12}>
          {kind === 'current' ? 'Peak inrush' : 'Time until the bypass closes'}
        </SvgText>
        {showAxis
          ? x
              .ticks(6)
              // 1-2-5 only, so that the labels of a log axis never run into each other.
              .filter((v) => [1, 2, 5].includes(Math.round(v / 10 ** Math.floor(Math.log10(v) + 1e-9))))
              .filter((v, i, all) => {
                // On a narrow chart keep labels at least 52 px apart.
                let last = -Infinity;
                for (const w of all.slice(0, i + 1)) if (x(w) - last >= 52) last = x(w);
                return last === x(v);
              })
              .map((v) => (
                <SvgText key={v} x={x(v)} y={yb + 16} textAnchor="middle" fill={theme.color.mutedInk} {...font}>
                  {formatEng(v, 'Ω', 2)}
                </SvgText>
              ))
          : null}
      </G>
    );
  };

  return (
    <View testID={testID} style={{ gap: 4 }}>
      <View
        onLayout={(e) => setWidth(Math.round(e.nativeEvent.layout.width))}
        accessible
        accessibilityRole="image"
        accessibilityLabel={summary}
        style={{ width: '100%' }}
      >
        {width > 0 ? (
          <Svg width={width} height={panelH * 2 + M.axis}>
            {panel(0, 'current', false)}
            {panel(panelH, 'time', true)}
          </Svg>
        ) : (
          <View style={{ height: 280 }} />
        )}
      </View>
      <Text variant="caption" muted>
        Lines: first-order estimate. Dots: the engine’s re-simulated figures for each standard value (filled: the recommended
        one). Green: the window.
      </Text>
      <Text variant="caption" testID={`${testID}-summary`}>
        {summary}
      </Text>
    </View>
  );
}
