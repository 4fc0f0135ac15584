import { line as d3line } from 'd3-shape';
import { useCallback, useMemo, useRef, useState } from 'react';
import { Platform, View, type GestureResponderEvent, type LayoutChangeEvent } from 'react-native';
import Svg, { Circle, G, Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import { Segmented } from '@/components/ui/Segmented';
import { Text } from '@/components/ui/Text';
import { useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';
import {
  PANELS,
  SERIES,
  findPeak,
  hasSignal,
  indexAtTime,
  layoutChart,
  placeLabels,
  thin,
  zoomWindows,
  type Peak,
  type RatingLine,
  type SeriesKey,
  type WaveformData,
} from './waveformGeometry';

export type { Peak, RatingLine, WaveformData } from './waveformGeometry';

export interface WaveformChartProps {
  waveform: WaveformData;
  /** Peaks as the engine measured them (exact, not limited to the sample grid); found in the data otherwise. */
  peaks?: Partial<Record<SeriesKey, Peak | null>>;
  ratingLines?: RatingLine[];
  /** Fixed width (tests); otherwise the chart fills its container. */
  width?: number;
  testID?: string;
  /** Dims the traces while the inputs have a problem and the shown result is the last good one. */
  stale?: boolean;
}

/**
 * The transient: voltages, current and precharge resistor power over time on panels that share a
 * time axis; peaks marked, rating lines dashed in the colour of the status they would trip, a
 * cursor with a readout (hover, touch, or the arrow keys), and zoom to the first part of the run.
 */
export function WaveformChart({
  waveform,
  peaks,
  ratingLines = [],
  width: fixedWidth,
  testID = 'waveform-chart',
  stale,
}: WaveformChartProps) {
  const theme = useTheme();
  const [measured, setMeasured] = useState(0);
  const width = fixedWidth ?? measured;
  const duration = waveform.t.length ? waveform.t[waveform.t.length - 1] : 0;
  const windows = useMemo(() => zoomWindows(duration), [duration]);
  const [windowChoice, setWindowChoice] = useState<number | null>(null);
  const window = windowChoice !== null && windows.includes(windowChoice) ? windowChoice : duration;
  const [cursor, setCursor] = useState<number | null>(null);
  const frame = useRef<View>(null);

  const panelHeight = Math.round(Math.min(220, Math.max(150, width * 0.3)));
  const geometry = useMemo(
    () => (width > 0 && duration > 0 ? layoutChart(waveform, width, window, ratingLines, panelHeight) : null),
    [waveform, width, window, ratingLines, panelHeight, duration],
  );

  const shownSeries = (Object.keys(SERIES) as SeriesKey[]).filter((s) => hasSignal(waveform[s]));
  const peakOf = useCallback((s: SeriesKey): Peak | null => peaks?.[s] ?? findPeak(waveform.t, waveform[s]), [peaks, waveform]);

  const summary = useMemo(() => {
    if (duration <= 0) return 'No waveform.';
    const parts = shownSeries.map((s) => {
      const p = peakOf(s);
      return p ? `${SERIES[s].label} peaks at ${formatEng(p.value, SERIES[s].unit)} at ${formatEng(p.time, 's')}` : '';
    });
    const lines = ratingLines.map((l) => `${l.label} ${formatEng(l.value, PANELS[l.panel].unit)}`);
    return `Waveform over ${formatEng(duration, 's')}. ${parts.filter(Boolean).join('; ')}.${lines.length ? ` Rating lines: ${lines.join(', ')}.` : ''}`;
  }, [duration, shownSeries, peakOf, ratingLines]);

  const moveTo = useCallback(
    (px: number) => {
      if (!geometry) return;
      const time = geometry.x.invert(px);
      if (time < 0 || time > window) {
        setCursor(null);
        return;
      }
      setCursor(indexAtTime(waveform.t, time));
    },
    [geometry, waveform.t, window],
  );

  const pointerX = (event: { nativeEvent: unknown }): number | null => {
    const e = event.nativeEvent as { locationX?: number; clientX?: number; pageX?: number };
    if (Platform.OS === 'web') {
      const node = frame.current as unknown as HTMLElement | null;
      const x = e.clientX ?? e.pageX;
      if (node?.getBoundingClientRect && typeof x === 'number') return x - node.getBoundingClientRect().left;
    }
    return typeof e.locationX === 'number' ? e.locationX : null;
  };

  const onKey = (event: { nativeEvent: { key: string }; preventDefault?: () => void }) => {
    const key = event.nativeEvent.key;
    if (key !== 'ArrowLeft' && key !== 'ArrowRight' && key !== 'Home' && key !== 'End' && key !== 'Escape') return;
    event.preventDefault?.();
    const last = indexAtTime(waveform.t, window);
    const step = Math.max(1, Math.round(last / 100));
    setCursor((c) => {
      if (key === 'Escape') return null;
      if (key === 'Home') return 0;
      if (key === 'End') return last;
      const base = c ?? 0;
      return Math.min(last, Math.max(0, base + (key === 'ArrowRight' ? step : -step)));
    });
  };

  const onLayout = (e: LayoutChangeEvent) => {
    if (fixedWidth === undefined) setMeasured(Math.round(e.nativeEvent.layout.width));
  };

  const colour = (s: SeriesKey) => {
    const t = theme.color.trace;
    return s === 'vC' ? t.capacitorVoltage : s === 'v' ? t.busVoltage : s === 'i' ? t.current : t.resistorPower;
  };
  const axisFont = { fontFamily: theme.fonts.mono, fontSize: 11 };

  return (
    <View testID={testID} style={{ gap: theme.space.s }}>
      <View
        style={{
          flexDirection: 'row',
          flexWrap: 'wrap',
          alignItems: 'center',
          justifyContent: 'space-between',
          gap: theme.space.s,
        }}
      >
        <View
          style={{ flexDirection: 'row', flexWrap: 'wrap', columnGap: theme.space.m, rowGap: 4, flexShrink: 1, minWidth: 0 }}
          accessibilityLabel="Legend"
        >
          {shownSeries.map((s) => (
            <View key={s} style={{ flexDirection: 'row', alignItems: 'center', gap: 6 }}>
              <View style={{ width: 16, height: 3, borderRadius: 2, backgroundColor: colour(s) }} />
              <Text variant="caption">{SERIES[s].label}</Text>
            </View>
          ))}
          {ratingLines.length ? (
            <View style={{ flexDirection: 'row', alignItems: 'center', gap: 6 }}>
              <Svg width={18} height={4} aria-hidden>
                <Line x1={0} y1={2} x2={18} y2={2} stroke={theme.color.status.warn} strokeWidth={2} strokeDasharray="4 3" />
              </Svg>
              <Text variant="caption">rating lines</Text>
            </View>
          ) : null}
        </View>
        {windows.length > 1 ? (
          <Segmented
            accessibilityLabel="Time span shown"
            testID={`${testID}-zoom`}
            value={String(window)}
            onChange={(v) => {
              setWindowChoice(Number(v));
              setCursor(null);
            }}
            options={windows.map((w, k) => ({
              value: String(w),
              label: k === 0 ? `Whole run, ${formatEng(w, 's')}` : `First ${formatEng(w, 's')}`,
            }))}
          />
        ) : null}
      </View>

      <View
        ref={frame}
        testID={`${testID}-frame`}
        onLayout={onLayout}
        accessible
        focusable
        accessibilityRole="image"
        accessibilityLabel={summary}
        accessibilityHint="Use the left and right arrow keys to move the cursor along the time axis."
        onStartShouldSetResponder={() => true}
        onMoveShouldSetResponder={() => true}
        onResponderGrant={(e: GestureResponderEvent) => {
          const x = pointerX(e);
          if (x !== null) moveTo(x);
        }}
        onResponderMove={(e: GestureResponderEvent) => {
          const x = pointerX(e);
          if (x !== null) moveTo(x);
        }}
        {...(Platform.OS === 'web'
          ? {
              onPointerMove: (e: { nativeEvent: unknown }) => {
                const x = pointerX(e);
                if (x !== null) moveTo(x);
              },
              onPointerLeave: () => setCursor(null),
              onKeyDown: onKey,
            }
          : {})}
        style={{ width: '100%', opacity: stale ? 0.45 : 1, touchAction: 'pan-y' } as object}
      >
        {geometry ? (
          <Svg width={geometry.width} height={geometry.height}>
            {geometry.panels.map((panel) => {
              const [x0, x1] = panel.x.range();
              const ticksY = panel.y.ticks(4);
              const ticksX = panel.x.ticks(Math.max(2, Math.floor(geometry.width / 110)));
              const path = d3line<[number, number]>()
                .x((d) => panel.x(d[0]))
                .y((d) => panel.y(d[1]));
              const plotBottom = panel.y.range()[0];
              return (
                <G key={panel.key} y={panel.top} testID={`panel-${panel.key}`}>
                  <Rect
                    x={x0}
                    y={panel.y.range()[1]}
                    width={x1 - x0}
                    height={panel.plotHeight}
                    fill={theme.color.card}
                    stroke={theme.color.hairline}
                  />
                  {ticksY.map((v) => (
                    <G key={`y${v}`}>
                      <Line x1={x0} x2={x1} y1={panel.y(v)} y2={panel.y(v)} stroke={theme.color.hairline} strokeWidth={1} />
                      <SvgText x={x0 - 6} y={panel.y(v) + 4} textAnchor="end" fill={theme.color.mutedInk} {...axisFont}>
                        {formatEng(v, PANELS[panel.key].unit, 3)}
                      </SvgText>
                    </G>
                  ))}
                  {panel.showAxis
                    ? ticksX.map((v) => (
                        <SvgText
                          key={`x${v}`}
                          x={panel.x(v)}
                          y={plotBottom + 16}
                          textAnchor="middle"
                          fill={theme.color.mutedInk}
                          {...axisFont}
                        >
                          {formatEng(v, 's', 3)}
                        </SvgText>
                      ))
                    : null}
                  {(() => {
                    const sides = placeLabels(panel.lines.map((l) => panel.y(l.value)));
                    return panel.lines.map((l, k) => (
                      <G key={`r${k}`} testID={`rating-line-${panel.key}-${k}`}>
                        <Line
                          x1={x0}
                          x2={x1}
                          y1={panel.y(l.value)}
                          y2={panel.y(l.value)}
                          stroke={theme.color.status[l.status]}
                          strokeWidth={1.5}
                          strokeDasharray="6 4"
                        />
                        {sides[k] ? (
                          <SvgText
                            x={sides[k] === 'right' ? x1 - 4 : x0 + 4}
                            y={panel.y(l.value) - 4}
                            textAnchor={sides[k] === 'right' ? 'end' : 'start'}
                            fill={theme.color.status[l.status]}
                            {...axisFont}
                          >
                            {`${l.label} ${formatEng(l.value, PANELS[panel.key].unit)}`}
                          </SvgText>
                        ) : null}
                      </G>
                    ));
                  })()}
                  {panel.series.map((s) => (
                    <Path
                      key={s}
                      d={path(thin(waveform.t, waveform[s]!, geometry.window, panel.x)) ?? ''}
                      stroke={colour(s)}
                      strokeWidth={s === 'v' ? 1.5 : 2}
                      fill="none"
                      strokeDasharray={s === 'v' ? '1 0' : undefined}
                    />
                  ))}
                  {panel.series.map((s) => {
                    const p = peakOf(s);
                    if (!p || p.time > geometry.window) return null;
                    const cx = panel.x(p.time);
                    const cy = panel.y(p.value);
                    const label = `peak ${formatEng(p.value, SERIES[s].unit)}`;
                    const anchorEnd = cx > (x0 + x1) / 2;
                    return (
                      <G key={`p${s}`}>
                        <Circle
                          testID={`peak-${s}`}
                          cx={cx}
                          cy={cy}
                          r={4.5}
                          fill={theme.color.card}
                          stroke={colour(s)}
                          strokeWidth={2}
                          accessibilityLabel={`${SERIES[s].label} ${label} at ${formatEng(p.time, 's')}`}
                        />
                        <SvgText
                          x={cx + (anchorEnd ? -8 : 8)}
                          y={Math.max(panel.y.range()[1] + 12, cy - 6)}
                          textAnchor={anchorEnd ? 'end' : 'start'}
                          fill={colour(s)}
                          {...axisFont}
                          fontSize={11}
                        >
                          {label}
                        </SvgText>
                      </G>
                    );
                  })}
                  {cursor !== null ? (
                    <G>
                      <Line
                        x1={panel.x(waveform.t[cursor])}
                        x2={panel.x(waveform.t[cursor])}
                        y1={panel.y.range()[1]}
                        y2={plotBottom}
                        stroke={theme.color.ink}
                        strokeWidth={1}
                        strokeOpacity={0.5}
                      />
                      {panel.series.map((s) => (
                        <Circle
                          key={`c${s}`}
                          cx={panel.x(waveform.t[cursor])}
                          cy={panel.y(waveform[s]![cursor])}
                          r={3.5}
                          fill={colour(s)}
                        />
                      ))}
                    </G>
                  ) : null}
                </G>
              );
            })}
          </Svg>
        ) : (
          <View style={{ height: 200 }} />
        )}
      </View>

      <View
        testID={`${testID}-readout`}
        accessibilityLiveRegion="polite"
        style={{ minHeight: 20, flexDirection: 'row', flexWrap: 'wrap', columnGap: theme.space.m }}
      >
        {cursor !== null ? (
          <>
            <Text variant="caption" mono>
              t = {formatEng(waveform.t[cursor], 's', 4)}
            </Text>
            {shownSeries.map((s) => (
              <Text key={s} variant="caption" mono color={colour(s)}>
                {SERIES[s].short} = {formatEng(waveform[s]![cursor], SERIES[s].unit, 4)}
              </Text>
            ))}
          </>
        ) : (
          <Text variant="caption" muted>
            {Platform.OS === 'web'
              ? 'Point at the chart, touch it, or focus it and use the arrow keys to read values.'
              : 'Touch the chart to read values.'}
          </Text>
        )}
      </View>
      {geometry?.panels.some((p) => p.offscale.length) ? (
        <Text variant="caption" muted>
          Above the chart:{' '}
          {geometry.panels
            .flatMap((p) => p.offscale.map((l) => `${l.label} ${formatEng(l.value, PANELS[p.key].unit)}`))
            .join(', ')}
          .
        </Text>
      ) : null}
      <Text variant="caption" muted testID={`${testID}-summary`}>
        {summary}
      </Text>
    </View>
  );
}
