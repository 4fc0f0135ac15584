import { View } from 'react-native';
import Svg, { Circle, G, Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import { Text } from '@/components/ui/Text';
import { useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

/** What the sketch needs to know: which parts are fitted and their headline values (SI, or null). */
export interface SketchParts {
  sourceVoltage: number | null;
  sourceImpedance: boolean;
  precharge: { resistance: number | null; bypass: boolean } | null;
  filter: { inductance: number | null } | null;
  capacitance: number | null;
  damping: boolean;
  bleeder: { resistance: number | null } | null;
  load: { kind: 'resistance' | 'current' | 'power'; value: number | null } | null;
}

const VB_H = 236;
const TOP = 60;
const BOTTOM = 190;

const show = (v: number | null, unit: string) => (v === null || !Number.isFinite(v) ? '' : formatEng(v, unit));

/** A one-line sketch of the circuit as it stands: fitted parts drawn, absent ones named beneath. */
export function CircuitSketch({ parts, testID = 'circuit-sketch' }: { parts: SketchParts; testID?: string }) {
  const theme = useTheme();
  const ink = theme.color.ink;
  const muted = theme.color.mutedInk;
  const s = {
    stroke: ink,
    strokeWidth: 2,
    fill: 'none' as const,
    strokeLinecap: 'round' as const,
    strokeLinejoin: 'round' as const,
  };
  const label = { fill: muted, fontSize: 12, fontFamily: theme.fonts.mono };
  const name = { fill: ink, fontSize: 12, fontFamily: theme.fonts.semibold };

  const absent: string[] = [];
  if (!parts.precharge) absent.push('precharge');
  if (!parts.filter) absent.push('input filter');
  if (!parts.damping) absent.push('damping branch');
  if (!parts.bleeder) absent.push('bleeder');
  if (!parts.load) absent.push('load');

  // Series chain along the top rail, left to right.
  const series: { key: string; width: number; draw: (x: number) => React.ReactNode }[] = [];
  if (parts.sourceImpedance)
    series.push({
      key: 'zs',
      width: 90,
      draw: (x) => <Resistor key="zs" x={x} w={90} s={s} title="source R, L" label="" name={name} val={label} />,
    });
  if (parts.precharge) {
    const p = parts.precharge;
    series.push({
      key: 'pre',
      width: 130,
      draw: (x) => (
        <G key="pre">
          <Resistor x={x} w={130} s={s} title="precharge" label={show(p.resistance, 'Ω')} name={name} val={label} />
          {p.bypass ? (
            <G>
              <Line x1={x + 10} y1={TOP} x2={x + 10} y2={TOP - 28} {...s} />
              <Line x1={x + 120} y1={TOP} x2={x + 120} y2={TOP - 28} {...s} />
              <Line x1={x + 10} y1={TOP - 28} x2={x + 50} y2={TOP - 28} {...s} />
              <Line x1={x + 80} y1={TOP - 28} x2={x + 120} y2={TOP - 28} {...s} />
              <Line x1={x + 50} y1={TOP - 28} x2={x + 78} y2={TOP - 40} {...s} />
              <Circle cx={x + 50} cy={TOP - 28} r={2.5} fill={ink} />
              <SvgText x={x + 65} y={TOP - 44} textAnchor="middle" {...label}>
                bypass
              </SvgText>
            </G>
          ) : null}
        </G>
      ),
    });
  }
  if (parts.filter) {
    const f = parts.filter;
    series.push({
      key: 'lf',
      width: 110,
      draw: (x) => (
        <Inductor key="lf" x={x} w={110} s={s} title="filter" label={show(f.inductance, 'H')} name={name} val={label} />
      ),
    });
  }

  // Shunt branches hang from the rail after the series chain.
  const shunts: { key: string; draw: (x: number) => React.ReactNode }[] = [];
  shunts.push({
    key: 'c',
    draw: (x) => <Capacitor key="c" x={x} s={s} title="DC link" label={show(parts.capacitance, 'F')} name={name} val={label} />,
  });
  if (parts.damping) shunts.push({ key: 'd', draw: (x) => <Damping key="d" x={x} s={s} name={name} /> });
  if (parts.bleeder)
    shunts.push({
      key: 'b',
      draw: (x) => (
        <ShuntResistor key="b" x={x} s={s} title="bleeder" label={show(parts.bleeder!.resistance, 'Ω')} name={name} val={label} />
      ),
    });
  if (parts.load) {
    const l = parts.load;
    const unit = l.kind === 'resistance' ? 'Ω' : l.kind === 'current' ? 'A' : 'W';
    const glyph = l.kind === 'resistance' ? 'R' : l.kind === 'current' ? 'I' : 'P';
    shunts.push({
      key: 'l',
      draw: (x) => <LoadBox key="l" x={x} s={s} glyph={glyph} label={show(l.value, unit)} name={name} val={label} />,
    });
  }

  let x = 70;
  const seriesNodes = series.map((part) => {
    const node = part.draw(x + 10);
    x += part.width + 20;
    return node;
  });
  const firstShunt = x + 30;
  // The DC link's labels sit to its right; the other branches are labelled underneath.
  const shuntXs = shunts.map((_, k) => firstShunt + (k === 0 ? 0 : 110 + (k - 1) * 80));
  const railEnd = shuntXs[shuntXs.length - 1];
  const vbW = Math.max(railEnd + (shunts.length === 1 ? 100 : 40), 420);

  const description =
    `Circuit: source ${show(parts.sourceVoltage, 'V')}` +
    (parts.precharge
      ? `, precharge resistor ${show(parts.precharge.resistance, 'Ω')}${parts.precharge.bypass ? ' with a bypass contactor' : ''}`
      : '') +
    (parts.filter ? `, input filter ${show(parts.filter.inductance, 'H')}` : '') +
    `, DC-link capacitor ${show(parts.capacitance, 'F')}` +
    (parts.damping ? ', damping branch' : '') +
    (parts.bleeder ? `, bleeder ${show(parts.bleeder.resistance, 'Ω')}` : '') +
    (parts.load
      ? `, ${parts.load.kind} load ${show(parts.load.value, parts.load.kind === 'resistance' ? 'Ω' : parts.load.kind === 'current' ? 'A' : 'W')}`
      : '') +
    '.';

  return (
    <View testID={testID} style={{ gap: 4 }}>
      <View
        accessible
        accessibilityRole="image"
        accessibilityLabel={description}
        style={{ width: '100%', aspectRatio: vbW / VB_H, maxWidth: vbW * 1.4 }}
      >
        <Svg width="100%" height="100%" viewBox={`0 0 ${vbW} ${VB_H}`}>
          {/* Source: a battery between the rails. */}
          <Line x1={40} y1={TOP} x2={40} y2={110} {...s} />
          <Line x1={24} y1={110} x2={56} y2={110} {...s} strokeWidth={3} />
          <Line x1={32} y1={120} x2={48} y2={120} {...s} strokeWidth={3} />
          <Line x1={24} y1={130} x2={56} y2={130} {...s} strokeWidth={3} />
          <Line x1={32} y1={140} x2={48} y2={140} {...s} strokeWidth={3} />
          <Line x1={40} y1={140} x2={40} y2={BOTTOM} {...s} />
          <SvgText x={62} y={124} {...name}>
            Vs
          </SvgText>
          <SvgText x={62} y={140} {...label}>
            {show(parts.sourceVoltage, 'V')}
          </SvgText>
          {/* Rails */}
          <Line x1={40} y1={TOP} x2={railEnd} y2={TOP} {...s} />
          <Line x1={40} y1={BOTTOM} x2={railEnd} y2={BOTTOM} {...s} />
          {/* Series parts sit on the top rail; a white gap behind each. */}
          {seriesNodes}
          {shunts.map((sh, k) => sh.draw(shuntXs[k]))}
        </Svg>
      </View>
      {absent.length ? (
        <Text variant="caption" muted testID={`${testID}-absent`}>
          Not fitted: {absent.join(', ')}.
        </Text>
      ) : null}
    </View>
  );
}

type S = { stroke: string; strokeWidth: number; fill: 'none'; strokeLinecap: 'round'; strokeLinejoin: 'round' };
type T = { fill: string; fontSize: number; fontFamily: string };

function Gap({ x, w }: { x: number; w: number }) {
  const theme = useTheme();
  return <Rect x={x} y={TOP - 3} width={w} height={6} fill={theme.color.card} />;
}

function Resistor({
  x,
  w,
  s,
  title,
  label,
  name,
  val,
}: {
  x: number;
  w: number;
  s: S;
  title: string;
  label: string;
  name: T;
  val: T;
}) {
  const bw = 56;
  const bx = x + (w - bw) / 2;
  return (
    <G>
      <Gap x={bx} w={bw} />
      <Rect x={bx} y={TOP - 10} width={bw} height={20} rx={2} {...s} />
      <SvgText x={x + w / 2} y={TOP + 30} textAnchor="middle" {...name}>
        {title}
      </SvgText>
      <SvgText x={x + w / 2} y={TOP + 46} textAnchor="middle" {...val}>
        {label}
      </SvgText>
    </G>
  );
}

function Inductor({
  x,
  w,
  s,
  title,
  label,
  name,
  val,
}: {
  x: number;
  w: number;
  s: S;
  title: string;
  label: string;
  name: T;
  val: T;
}) {
  const n = 4;
  const r = 8;
  const start = x + (w - n * 2 * r) / 2;
  let d = `M ${start} ${TOP}`;
  for (let k = 0; k < n; k++) d += ` a ${r} ${r} 0 0 1 ${2 * r} 0`;
  return (
    <G>
      <Gap x={start} w={n * 2 * r} />
      <Path d={d} {...s} />
      <SvgText x={x + w / 2} y={TOP + 30} textAnchor="middle" {...name}>
        {title}
      </SvgText>
      <SvgText x={x + w / 2} y={TOP + 46} textAnchor="middle" {...val}>
        {label}
      </SvgText>
    </G>
  );
}

function Capacitor({ x, s, title, label, name, val }: { x: number; s: S; title: string; label: string; name: T; val: T }) {
  const mid = (TOP + BOTTOM) / 2;
  return (
    <G>
      <Line x1={x} y1={TOP} x2={x} y2={mid - 6} {...s} />
      <Line x1={x - 16} y1={mid - 6} x2={x + 16} y2={mid - 6} {...s} strokeWidth={3} />
      <Path d={`M ${x - 16} ${mid + 8} Q ${x} ${mid + 2} ${x + 16} ${mid + 8}`} {...s} strokeWidth={3} />
      <Line x1={x} y1={mid + 5} x2={x} y2={BOTTOM} {...s} />
      <SvgText x={x + 20} y={mid - 10} {...name}>
        {title}
      </SvgText>
      <SvgText x={x + 20} y={mid + 6} {...val}>
        {label}
      </SvgText>
      <Circle cx={x} cy={TOP} r={3} fill={s.stroke} />
      <Circle cx={x} cy={BOTTOM} r={3} fill={s.stroke} />
    </G>
  );
}

function Damping({ x, s, name }: { x: number; s: S; name: T }) {
  return (
    <G>
      <Line x1={x} y1={TOP} x2={x} y2={TOP + 20} {...s} />
      <Rect x={x - 8} y={TOP + 20} width={16} height={34} rx={2} {...s} />
      <Line x1={x} y1={TOP + 54} x2={x} y2={TOP + 80} {...s} />
      <Line x1={x - 14} y1={TOP + 80} x2={x + 14} y2={TOP + 80} {...s} strokeWidth={3} />
      <Line x1={x - 14} y1={TOP + 88} x2={x + 14} y2={TOP + 88} {...s} strokeWidth={3} />
      <Line x1={x} y1={TOP + 88} x2={x} y2={BOTTOM} {...s} />
      <SvgText x={x} y={BOTTOM + 20} textAnchor="middle" {...name}>
        damping
      </SvgText>
      <Circle cx={x} cy={TOP} r={3} fill={s.stroke} />
      <Circle cx={x} cy={BOTTOM} r={3} fill={s.stroke} />
    </G>
  );
}

function ShuntResistor({ x, s, title, label, name, val }: { x: number; s: S; title: string; label: string; name: T; val: T }) {
  const mid = (TOP + BOTTOM) / 2;
  return (
    <G>
      <Line x1={x} y1={TOP} x2={x} y2={mid - 22} {...s} />
      <Rect x={x - 8} y={mid - 22} width={16} height={44} rx={2} {...s} />
      <Line x1={x} y1={mid + 22} x2={x} y2={BOTTOM} {...s} />
      <SvgText x={x} y={BOTTOM + 20} textAnchor="middle" {...name}>
        {title}
      </SvgText>
      <SvgText x={x} y={BOTTOM + 36} textAnchor="middle" {...val}>
        {label}
      </SvgText>
      <Circle cx={x} cy={TOP} r={3} fill={s.stroke} />
      <Circle cx={x} cy={BOTTOM} r={3} fill={s.stroke} />
    </G>
  );
}

function LoadBox({ x, s, glyph, label, name, val }: { x: number; s: S; glyph: string; label: string; name: T; val: T }) {
  const mid = (TOP + BOTTOM) / 2;
  return (
    <G>
      <Line x1={x} y1={TOP} x2={x} y2={mid - 22} {...s} />
      <Rect x={x - 20} y={mid - 22} width={40} height={44} rx={4} {...s} />
      <SvgText x={x} y={mid + 5} textAnchor="middle" {...name} fontSize={15}>
        {glyph}
      </SvgText>
      <Line x1={x} y1={mid + 22} x2={x} y2={BOTTOM} {...s} />
      <SvgText x={x} y={BOTTOM + 20} textAnchor="middle" {...name}>
        load
      </SvgText>
      <SvgText x={x} y={BOTTOM + 36} textAnchor="middle" {...val}>
        {label}
      </SvgText>
      <Circle cx={x} cy={TOP} r={3} fill={s.stroke} />
      <Circle cx={x} cy={BOTTOM} r={3} fill={s.stroke} />
    </G>
  );
}
