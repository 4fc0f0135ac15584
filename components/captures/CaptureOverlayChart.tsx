// The measured trace (grey) over the engine's waveform of the same quantity: one panel, shared
// time axis, the capture shifted by the alignment the user sets.
import { line as d3line } from 'd3-shape';
import { useMemo, useState } from 'react';
import { View, type LayoutChangeEvent } from 'react-native';
import Svg, { G, Line, Path, Text as SvgText } from 'react-native-svg';
import { Text } from '@/components/ui/Text';
import type { Quantity, SimWaveform } from '@/lib/queries/bench';
import { useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

export interface OverlaySeries {
  label: string;
  t: number[];
  y: number[];
  color: string;
  dashed?: boolean;
  width?: number;
}

export const simulatedOf = (w: SimWaveform, q: Quantity): number[] => (q === 'capacitorVoltage' ? w.vC : q === 'busVoltage' ? w.v : w.i);

const PAD = { left: 56, right: 12, top: 12, bottom: 30 };

export function CaptureOverlayChart({ series, unit, testID = 'capture-overlay' }: { series: OverlaySeries[]; unit: 'V' | 'A'; testID?: string }) {
  const theme = useTheme();
  const [width, setWidth] = useState(0);
  const height = Math.round(Math.min(320, Math.max(220, width * 0.45)));
  const geometry = useMemo(() => {
    const all = series.filter((s) => s.t.length > 1);
    if (width <= 0 || all.length === 0) return null;
    let t0 = Infinity;
    let t1 = -Infinity;
    let y0 = Infinity;
    let y1 = -Infinity;
    for (const s of all) {
      t0 = Math.min(t0, s.t[0]);
      t1 = Math.max(t1, s.t[s.t.length - 1]);
      for (const v of s.y) {
        if (Number.isFinite(v)) {
          y0 = Math.min(y0, v);
          y1 = Math.max(y1, v);
        }
      }
    }
    if (!(t1 > t0)) return null;
    if (!(y1 > y0)) {
      y0 -= 1;
      y1 += 1;
    }
    const span = y1 - y0;
    y0 -= span * 0.05;
    y1 += span * 0.05;
    const w = width - PAD.left - PAD.right;
    const h = height - PAD.top - PAD.bottom;
    const x = (t: number) => PAD.left + ((t - t0) / (t1 - t0)) * w;
    const y = (v: number) => PAD.top + (1 - (v - y0) / (y1 - y0)) * h;
    const paths = all.map((s) => {
      const points = s.t.map((t, k) => [x(t), y(s.y[k])] as [number, number]).filter((p) => Number.isFinite(p[1]));
      return { ...s, d: d3line()(points) ?? '' };
    });
    const ticks = [0, 0.25, 0.5, 0.75, 1];
    return {
      paths,
      xTicks: ticks.map((f) => ({ px: PAD.left + f * w, label: formatEng(t0 + f * (t1 - t0), 's', 3) })),
      yTicks: ticks.map((f) => ({ py: PAD.top + (1 - f) * h, label: formatEng(y0 + f * (y1 - y0), unit, 3) })),
      w,
      h,
    };
  }, [series, width, height, unit]);

  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width));
  return (
    <View onLayout={onLayout} testID={testID} accessibilityLabel={`Overlay of ${series.map((s) => s.label).join(', ')}`}>
      {geometry ? (
        <Svg width={width} height={height}>
          <G>
            {geometry.yTicks.map((t) => (
              <G key={`y${t.py}`}>
                <Line x1={PAD.left} x2={PAD.left + geometry.w} y1={t.py} y2={t.py} stroke={theme.color.hairline} strokeWidth={1} />
                <SvgText x={PAD.left - 6} y={t.py + 4} fontSize={10} textAnchor="end" fill={theme.color.mutedInk}>
                  {t.label}
                </SvgText>
              </G>
            ))}
            {geometry.xTicks.map((t) => (
              <SvgText key={`x${t.px}`} x={t.px} y={PAD.top + geometry.h + 18} fontSize={10} textAnchor="middle" fill={theme.color.mutedInk}>
                {t.label}
              </SvgText>
            ))}
            {geometry.paths.map((p) => (
              <Path
                key={p.label}
                d={p.d}
                fill="none"
                stroke={p.color}
                strokeWidth={p.width ?? 1.5}
                strokeDasharray={p.dashed ? '6 4' : undefined}
              />
            ))}
          </G>
        </Svg>
      ) : (
        <View style={{ height }} />
      )}
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: 12, marginTop: 4 }}>
        {series.map((s) => (
          <View key={s.label} style={{ flexDirection: 'row', alignItems: 'center', gap: 6 }}>
            <View style={{ width: 18, height: 3, backgroundColor: s.color, opacity: s.dashed ? 0.7 : 1 }} />
            <Text variant="caption" muted>
              {s.label}
            </Text>
          </View>
        ))}
      </View>
    </View>
  );
}
