import { View } from 'react-native';
import Svg, { Circle, G, Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import { Text } from '@/components/ui/Text';
import { readQuantity } from '@/components/ui/UnitField';
import { useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

/** A mains design's source side: AC supply, line impedance, inrush limiter and the diode bridge. */
export interface MainsSketch {
  kind: 'single-phase' | 'three-phase';
  /** RMS (line-to-line for three-phase), V. */
  voltage: number | null;
  frequency: number | null;
  lineImpedance: boolean;
  /** The limiter: a resistor (its R) or an NTC (its R25), with or without the bypass relay. */
  limiter: { kind: 'resistor' | 'ntc'; resistance: number | null; bypass: boolean } | null;
}

/** What the sketch needs to know: which parts are fitted and their headline values (SI, or null). */
export interface SketchParts {
  /** Set for a mains design (a design with a mains section): drawn instead of the battery. */
  mains?: MainsSketch | null;
  sourceVoltage: number | null;
  sourceImpedance: boolean;
  precharge: { resistance: number | null; bypass: boolean } | null;
  filter: { inductance: number | null } | null;
  capacitance: number | null;
  damping: boolean;
  bleeder: { resistance: number | null } | null;
  load: { kind: 'resistance' | 'current' | 'power'; value: number | null } | null;
}

/** The mains part of the sketch, read from a draft as it is (even half-edited); null for a DC design. */
export function mainsSketchOf(draft: Record<string, unknown>): MainsSketch | null {
  const mains = draft.mains;
  if (!mains || typeof mains !== 'object') return null;
  const m = mains as Record<string, unknown>;
  const quantity = (raw: unknown, dimension: 'voltage' | 'frequency' | 'resistance' | 'inductance'): number | null => {
    if (typeof raw === 'number') return raw;
    if (typeof raw !== 'string') return null;
    const parsed = readQuantity(raw, dimension);
    return parsed.ok === true ? parsed.value : null;
  };
  const limiter = (m.limiter ?? null) as Record<string, unknown> | null;
  const limiterKind = limiter?.kind;
  return {
    kind: m.kind === 'three-phase' ? 'three-phase' : 'single-phase',
    voltage: quantity(m.voltage, 'voltage'),
    // The engine's default is 50 Hz.
    frequency: m.frequency === undefined || m.frequency === null ? 50 : quantity(m.frequency, 'frequency'),
    lineImpedance: (quantity(m.lineResistance, 'resistance') ?? 0) > 0 || (quantity(m.lineInductance, 'inductance') ?? 0) > 0,
    limiter:
      limiterKind === 'resistor' || limiterKind === 'ntc'
        ? {
            kind: limiterKind,
            resistance: quantity(limiterKind === 'ntc' ? limiter!.r25 : limiter!.resistance, 'resistance'),
            bypass: limiter!.bypass !== undefined && limiter!.bypass !== null,
          }
        : null,
  };
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

  const mains = parts.mains ?? null;
  const absent: string[] = [];
  if (mains) {
    if (!mains.limiter) absent.push('inrush limiter');
  } else {
    if (!parts.precharge) absent.push('precharge');
    if (!parts.filter) absent.push('input filter');
  }
  if (!parts.damping) absent.push('damping branch');
  if (!parts.bleeder) absent.push('bleeder');
  if (!parts.load) absent.push('load');

  // Series chain along the top rail, left to right.
  const series: { key: string; width: number; draw: (x: number) => React.ReactNode; minX?: number }[] = [];
  if (mains) {
    const limiter = mains.limiter;
    const limiterPart = limiter
      ? {
          key: 'limiter',
          width: 130,
          draw: (x: number) => (
            <Limiter key="limiter" x={x} w={130} s={s} limiter={limiter} name={name} val={label} ink={ink} testID={testID} />
          ),
        }
      : null;
    if (mains.lineImpedance)
      series.push({
        key: 'zline',
        width: 90,
        draw: (x) => <Resistor key="zline" x={x} w={90} s={s} title="line R, L" label="" name={name} val={label} />,
      });
    // Single-phase: the limiter sits in the line, before the bridge; three-phase: in the DC link after it.
    if (limiterPart && mains.kind === 'single-phase') series.push(limiterPart);
    const width = mains.kind === 'three-phase' ? 84 : 64;
    series.push({
      key: 'bridge',
      width,
      // The bridge spans both rails: keep it clear of the source's label in the middle band.
      minX: 170,
      draw: (x) => <Bridge key="bridge" x={x} w={width} s={s} kind={mains.kind} name={name} val={label} testID={`${testID}-bridge`} />,
    });
    if (limiterPart && mains.kind === 'three-phase') series.push(limiterPart);
  }
  if (!mains && parts.sourceImpedance)
    series.push({
      key: 'zs',
      width: 90,
      draw: (x) => <Resistor key="zs" x={x} w={90} s={s} title="source R, L" label="" name={name} val={label} />,
    });
  if (!mains && parts.precharge) {
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
  if (!mains && parts.filter) {
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
    if (part.minX !== undefined) x = Math.max(x, part.minX - 10);
    const node = part.draw(x + 10);
    x += part.width + 20;
    return node;
  });
  const firstShunt = x + 30;
  // The DC link's labels sit to its right; the other branches are labelled underneath.
  const shuntXs = shunts.map((_, k) => firstShunt + (k === 0 ? 0 : 110 + (k - 1) * 80));
  const railEnd = shuntXs[shuntXs.length - 1];
  const vbW = Math.max(railEnd + (shunts.length === 1 ? 100 : 40), 420);

  const limiterText = (l: NonNullable<MainsSketch['limiter']>) =>
    (l.kind === 'ntc' ? `NTC limiter ${show(l.resistance, 'Ω')} at 25 °C` : `limiter resistor ${show(l.resistance, 'Ω')}`) +
    (l.bypass ? ' with a bypass relay' : '');
  const sourceText = mains
    ? `${mains.kind} AC mains ${show(mains.voltage, 'V')}${mains.frequency ? ` ${show(mains.frequency, 'Hz')}` : ''}` +
      (mains.lineImpedance ? ', line impedance' : '') +
      (mains.limiter && mains.kind === 'single-phase' ? `, ${limiterText(mains.limiter)}` : '') +
      `, diode bridge (${mains.kind === 'three-phase' ? 6 : 4} diodes)` +
      (mains.limiter && mains.kind === 'three-phase' ? `, ${limiterText(mains.limiter)}` : '')
    : `source ${show(parts.sourceVoltage, 'V')}`;
  const description =
    `Circuit: ${sourceText}` +
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
          {mains ? (
            <AcSource s={s} mains={mains} name={name} val={label} testID={`${testID}-ac-source`} />
          ) : (
            <G testID={`${testID}-battery`}>
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
            </G>
          )}
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

/** The AC supply: a circle with one sine period, between the rails; "3~" marks three-phase. */
function AcSource({ s, mains, name, val, testID }: { s: S; mains: MainsSketch; name: T; val: T; testID: string }) {
  const cx = 40;
  const cy = (TOP + BOTTOM) / 2;
  const r = 17;
  // One period of a sine, 20 px wide and 12 px high, drawn as two quadratic arcs.
  const wave = `M ${cx - 10} ${cy} Q ${cx - 5} ${cy - 12} ${cx} ${cy} Q ${cx + 5} ${cy + 12} ${cx + 10} ${cy}`;
  return (
    <G testID={testID}>
      <Line x1={cx} y1={TOP} x2={cx} y2={cy - r} {...s} />
      <Circle cx={cx} cy={cy} r={r} {...s} />
      <Path d={wave} {...s} />
      <Line x1={cx} y1={cy + r} x2={cx} y2={BOTTOM} {...s} />
      <SvgText x={62} y={cy - 6} {...name}>
        {mains.kind === 'three-phase' ? 'mains 3~' : 'mains'}
      </SvgText>
      <SvgText x={62} y={cy + 10} {...val}>
        {show(mains.voltage, 'V')}
      </SvgText>
      <SvgText x={62} y={cy + 26} {...val}>
        {show(mains.frequency, 'Hz')}
      </SvgText>
    </G>
  );
}

/** One diode pointing up (anode below, cathode above), centred at (x, y). */
function Diode({ x, y, s, ink, testID }: { x: number; y: number; s: S; ink: string; testID: string }) {
  const h = 9;
  const half = 7;
  return (
    <G testID={testID}>
      <Path d={`M ${x - half} ${y + h / 2} L ${x + half} ${y + h / 2} L ${x} ${y - h / 2} Z`} {...s} strokeWidth={1.5} fill={ink} />
      <Line x1={x - half} y1={y - h / 2} x2={x + half} y2={y - h / 2} {...s} strokeWidth={1.5} />
    </G>
  );
}

/**
 * The rectifier bridge as a box spanning both rails: AC in on the left (~), DC out on the right
 * (+ above, − below). Inside, one leg per phase (two single-phase, three three-phase), each two
 * diodes in series from the − bus up to the + bus with the phase joined between them.
 */
function Bridge({ x, w, s, kind, name, val, testID }: { x: number; w: number; s: S; kind: MainsSketch['kind']; name: T; val: T; testID: string }) {
  const theme = useTheme();
  const ink = s.stroke;
  const top = TOP - 12;
  const bottom = BOTTOM + 12;
  const plus = TOP + 14;
  const minus = BOTTOM - 14;
  const legs = kind === 'three-phase' ? 3 : 2;
  const gap = (w - 16) / legs;
  const legX = Array.from({ length: legs }, (_, k) => x + 8 + gap * (k + 0.5));
  const mid = (plus + minus) / 2;
  return (
    <G testID={testID}>
      <Rect x={x} y={top} width={w} height={bottom - top} rx={6} fill={theme.color.card} stroke={ink} strokeWidth={2} />
      <Line x1={legX[0]} y1={plus} x2={legX[legs - 1]} y2={plus} {...s} strokeWidth={1.5} />
      <Line x1={legX[0]} y1={minus} x2={legX[legs - 1]} y2={minus} {...s} strokeWidth={1.5} />
      {/* The DC terminals: + bus to the top rail's exit, − bus to the bottom rail's. */}
      <Line x1={legX[legs - 1]} y1={plus} x2={x + w} y2={TOP} {...s} strokeWidth={1.5} />
      <Line x1={legX[legs - 1]} y1={minus} x2={x + w} y2={BOTTOM} {...s} strokeWidth={1.5} />
      {legX.map((lx) => (
        <G key={lx}>
          <Line x1={lx} y1={plus} x2={lx} y2={minus} {...s} strokeWidth={1.5} />
          <Diode x={lx} y={(plus + mid) / 2} s={s} ink={ink} testID={`${testID}-diode`} />
          <Diode x={lx} y={(mid + minus) / 2} s={s} ink={ink} testID={`${testID}-diode`} />
          <Circle cx={lx} cy={mid} r={2.5} fill={ink} />
        </G>
      ))}
      <SvgText x={x + 4} y={TOP + 5} {...val} fontSize={14} fill={ink}>
        ~
      </SvgText>
      <SvgText x={x + 4} y={BOTTOM + 5} {...val} fontSize={14} fill={ink}>
        ~
      </SvgText>
      <SvgText x={x + w + 5} y={TOP - 6} {...val} fontSize={13} fill={ink}>
        +
      </SvgText>
      <SvgText x={x + w + 5} y={BOTTOM - 6} {...val} fontSize={13} fill={ink}>
        −
      </SvgText>
      <SvgText x={x + w / 2} y={BOTTOM + 30} textAnchor="middle" {...name}>
        bridge
      </SvgText>
      <SvgText x={x + w / 2} y={BOTTOM + 46} textAnchor="middle" {...val}>
        {kind === 'three-phase' ? '6 diodes' : '4 diodes'}
      </SvgText>
    </G>
  );
}

/** The inrush limiter on the rail: a resistor, or an NTC (the resistor crossed by the thermistor's hooked diagonal and "−t°"), with the relay that bypasses it. */
function Limiter({
  x,
  w,
  s,
  limiter,
  name,
  val,
  ink,
  testID,
}: {
  x: number;
  w: number;
  s: S;
  limiter: NonNullable<MainsSketch['limiter']>;
  name: T;
  val: T;
  ink: string;
  testID: string;
}) {
  const bw = 56;
  const bx = x + (w - bw) / 2;
  const ntc = limiter.kind === 'ntc';
  return (
    <G testID={ntc ? `${testID}-ntc` : `${testID}-limiter-resistor`}>
      <Resistor
        x={x}
        w={w}
        s={s}
        title={ntc ? 'NTC' : 'limiter'}
        label={ntc ? `${show(limiter.resistance, 'Ω')} at 25 °C` : show(limiter.resistance, 'Ω')}
        name={name}
        val={val}
      />
      {ntc ? (
        <G>
          <Line x1={bx - 4} y1={TOP + 15} x2={bx + bw + 6} y2={TOP - 16} {...s} strokeWidth={1.5} />
          <Line x1={bx - 14} y1={TOP + 15} x2={bx - 4} y2={TOP + 15} {...s} strokeWidth={1.5} />
          <SvgText x={bx + bw + 8} y={TOP + 20} {...val} fontSize={11}>
            −t°
          </SvgText>
        </G>
      ) : null}
      {limiter.bypass ? (
        <G testID={`${testID}-relay`}>
          <Line x1={x + 10} y1={TOP} x2={x + 10} y2={TOP - 28} {...s} />
          <Line x1={x + w - 10} y1={TOP} x2={x + w - 10} y2={TOP - 28} {...s} />
          <Line x1={x + 10} y1={TOP - 28} x2={x + 50} y2={TOP - 28} {...s} />
          <Line x1={x + 80} y1={TOP - 28} x2={x + w - 10} y2={TOP - 28} {...s} />
          <Line x1={x + 50} y1={TOP - 28} x2={x + 78} y2={TOP - 40} {...s} />
          <Circle cx={x + 50} cy={TOP - 28} r={2.5} fill={ink} />
          <SvgText x={x + 65} y={TOP - 44} textAnchor="middle" {...val}>
            relay
          </SvgText>
        </G>
      ) : null}
    </G>
  );
}
