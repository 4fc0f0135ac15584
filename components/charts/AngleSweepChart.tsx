import { scaleLinear } from 'd3-scale';
import { line as d3line } from 'd3-shape';
import { useState } from 'react';
import { View } from 'react-native';
import Svg, { Circle, G, Line, Path, Text as SvgText } from 'react-native-svg';
import { Text } from '@/components/ui/Text';
import type { MainsSweep } from '@/lib/queries/mains';
import { useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

const M = { left: 56, right: 16, top: 22, bottom: 34 };

/** Peak inrush against the switch-on angle; the worst angle (refined) marked, the design's own angle dashed. */
export function AngleSweepChart({ sweep, testID = 'angle-sweep-chart' }: { sweep: MainsSweep; testID?: string }) {
  const theme = useTheme();
  const [width, setWidth] = useState(0);
  const height = Math.round(Math.min(300, Math.max(200, width * 0.5)));
  const points = [...sweep.points, sweep.worst].sort((a, b) => a.angle - b.angle);
  const angles = points.map((p) => p.angle);
  const x = scaleLinear()
    .domain([Math.min(...angles), Math.max(...angles)])
    .range([M.left, Math.max(M.left + 10, width - M.right)]);
  const y = scaleLinear()
    .domain([0, Math.max(...points.map((p) => p.peakCurrent)) * 1.1])
    .nice(5)
    .range([height - M.bottom, M.top]);
  const path =
    d3line<(typeof points)[number]>()
      .x((p) => x(p.angle))
      .y((p) => y(p.peakCurrent))(points) ?? '';
  const font = { fontFamily: theme.fonts.mono, fontSize: 11 };
  const wx = x(sweep.worst.angle);
  const wy = y(sweep.worst.peakCurrent);
  const worstLabel = `worst ${sweep.worst.angle.toFixed(1)}°: ${formatEng(sweep.worst.peakCurrent, 'A')}`;
  // Mono 11 px is about 6.7 px a character: put the label on whichever side of the ring it fits.
  const labelLeft = wx + 10 + worstLabel.length * 6.7 > width - 4;
  const xTicks = x.ticks(width < 420 ? 4 : 8);
  return (
    <View
      testID={testID}
      onLayout={(e) => setWidth(Math.round(e.nativeEvent.layout.width))}
      accessibilityLabel={`Peak inrush current against switch-on angle. Worst at ${sweep.worst.angle.toFixed(1)} degrees, ${formatEng(sweep.worst.peakCurrent, 'A')}.`}
      style={{ width: '100%' }}
    >
      {width > 0 ? (
        <Svg width={width} height={height}>
          <G>
            {y.ticks(5).map((t) => (
              <G key={`y${t}`}>
                <Line x1={M.left} x2={width - M.right} y1={y(t)} y2={y(t)} stroke={theme.color.hairline} strokeWidth={1} />
                <SvgText x={M.left - 6} y={y(t) + 4} textAnchor="end" fill={theme.color.mutedInk} {...font}>
                  {formatEng(t, 'A', 2)}
                </SvgText>
              </G>
            ))}
            {xTicks.map((t) => (
              <SvgText key={`x${t}`} x={x(t)} y={height - M.bottom + 16} textAnchor="middle" fill={theme.color.mutedInk} {...font}>
                {`${t}°`}
              </SvgText>
            ))}
            <SvgText x={(M.left + width - M.right) / 2} y={height - 4} textAnchor="middle" fill={theme.color.mutedInk} fontSize={11}>
              switch-on angle of the mains
            </SvgText>
            {Number.isFinite(sweep.currentAngle) && sweep.currentAngle >= x.domain()[0] && sweep.currentAngle <= x.domain()[1] ? (
              <Line
                x1={x(sweep.currentAngle)}
                x2={x(sweep.currentAngle)}
                y1={M.top}
                y2={height - M.bottom}
                stroke={theme.color.mutedInk}
                strokeDasharray="4 4"
                strokeWidth={1}
              />
            ) : null}
            <Path d={path} stroke={theme.color.trace.current} strokeWidth={2} fill="none" />
            {sweep.points.map((p) => (
              <Circle key={p.angle} cx={x(p.angle)} cy={y(p.peakCurrent)} r={2.5} fill={theme.color.trace.current} />
            ))}
            <Line x1={wx} x2={wx} y1={wy} y2={height - M.bottom} stroke={theme.color.status.fail} strokeWidth={1} />
            <Circle cx={wx} cy={wy} r={6} stroke={theme.color.status.fail} strokeWidth={2} fill="none" testID="sweep-worst-marker" />
            <SvgText
              x={labelLeft ? wx - 10 : wx + 10}
              y={Math.max(M.top - 6, wy - 10) + 2}
              textAnchor={labelLeft ? 'end' : 'start'}
              fill={theme.color.ink}
              {...font}
              fontWeight="600"
            >
              {worstLabel}
            </SvgText>
          </G>
        </Svg>
      ) : (
        <View style={{ height }} />
      )}
      <Text variant="caption" muted>
        {`Peak inrush at ${sweep.points.length} angles, the worst refined between its neighbours (${sweep.runs} runs). Dashed: the design’s own angle, ${sweep.currentAngle.toFixed(1)}°.`}
      </Text>
    </View>
  );
}
