import { scaleLog } from 'd3-scale';
import { line as d3line } from 'd3-shape';
import { useState } from 'react';
import { View, type LayoutChangeEvent } from 'react-native';
import Svg, { Circle, G, Line, Path, Text as SvgText } from 'react-native-svg';
import { Text } from '@/components/ui/Text';
import { useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

/** |Zout| of the filter against |Zin| = V²/P of the load, log-log, the tightest point marked. */
export function ImpedanceChart({
  f,
  zout,
  zin,
  tightest,
  testID = 'impedance-chart',
}: {
  f: number[];
  zout: number[];
  zin: number;
  tightest: { f: number; marginDb: number };
  testID?: string;
}) {
  const theme = useTheme();
  const c = theme.color;
  const [width, setWidth] = useState(0);
  const height = Math.round(Math.min(300, Math.max(200, width * 0.55)));
  const pad = { l: 52, r: 12, t: 12, b: 34 };
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width));
  const finite = zout.filter((z) => z > 0 && Number.isFinite(z));
  const yMin = Math.min(zin, ...finite) / 2;
  const yMax = Math.max(zin, ...finite) * 2;
  const x = scaleLog().domain([f[0], f[f.length - 1]]).range([pad.l, Math.max(pad.l + 1, width - pad.r)]);
  const y = scaleLog().domain([yMin, yMax]).range([height - pad.b, pad.t]);
  const path =
    d3line<number>()
      .x((k) => x(f[k]))
      .y((k) => y(Math.max(zout[k], yMin)))(f.map((_, k) => k)) ?? '';
  const zAtTightest = zin / 10 ** (tightest.marginDb / 20);
  const summary = `|Zout| peaks at ${formatEng(zAtTightest, 'Ω')} at ${formatEng(tightest.f, 'Hz')}; |Zin| is ${formatEng(zin, 'Ω')}.`;
  return (
    <View onLayout={onLayout} testID={testID} accessible accessibilityLabel={`Impedance chart. ${summary}`}>
      {width > 0 ? (
        <Svg width={width} height={height}>
          {x.ticks(6).filter((t) => Number.isInteger(Math.log10(t))).map((t) => (
            <G key={`x${t}`}>
              <Line x1={x(t)} x2={x(t)} y1={pad.t} y2={height - pad.b} stroke={c.hairline} />
              <SvgText x={x(t)} y={height - pad.b + 16} fontSize={11} fill={c.mutedInk} textAnchor="middle">
                {formatEng(t, 'Hz')}
              </SvgText>
            </G>
          ))}
          {y.ticks(5).filter((t) => Number.isInteger(Math.log10(t))).map((t) => (
            <G key={`y${t}`}>
              <Line x1={pad.l} x2={width - pad.r} y1={y(t)} y2={y(t)} stroke={c.hairline} />
              <SvgText x={pad.l - 6} y={y(t) + 4} fontSize={11} fill={c.mutedInk} textAnchor="end">
                {formatEng(t, 'Ω')}
              </SvgText>
            </G>
          ))}
          <Line x1={pad.l} x2={width - pad.r} y1={y(zin)} y2={y(zin)} stroke={c.status.fail} strokeDasharray="6 4" strokeWidth={1.5} />
          <SvgText x={width - pad.r - 4} y={y(zin) - 6} fontSize={11} fill={c.status.fail} textAnchor="end">
            |Zin| = V²/P
          </SvgText>
          <Path d={path} stroke={c.trace.capacitorVoltage} strokeWidth={2} fill="none" />
          <Line x1={x(tightest.f)} x2={x(tightest.f)} y1={y(zAtTightest)} y2={y(zin)} stroke={c.ink} strokeDasharray="2 3" />
          <Circle cx={x(tightest.f)} cy={y(zAtTightest)} r={5} fill={c.card} stroke={c.ink} strokeWidth={2} />
        </Svg>
      ) : null}
      <Text variant="caption" muted>
        {summary}
      </Text>
    </View>
  );
}
