// The "Mains" group of the editor, for a design with a `mains` section (sim/mains): the AC source,
// the bridge's diodes and the inrush limiter. Values are kept as typed; the engine reads them.
import { View } from 'react-native';
import { Card } from '@/components/ui/Card';
import { Segmented } from '@/components/ui/Segmented';
import { TextField } from '@/components/ui/TextField';
import { Toggle } from '@/components/ui/Toggle';
import { UnitField } from '@/components/ui/UnitField';
import { useTheme } from '@/lib/theme';
import type { DesignIssue } from '@/sim/errors';
import type { Dimension } from '@/sim/units';
import { fieldText, getIn, type Draft } from './designForm';

export const isMainsDraft = (draft: Draft | null | undefined): boolean =>
  !!draft && typeof draft === 'object' && getIn(draft, 'mains') != null;

/** The editor's groups a mains design does not have: the DC source, precharge and filter are the mains side's. */
export const NOT_IN_MAINS = new Set(['source', 'precharge', 'filter']);

/** Paths the mains group shows (so the editor does not list their issues again at the top). */
export const MAINS_PATHS = [
  'mains.kind',
  'mains.voltage',
  'mains.frequency',
  'mains.angle',
  'mains.lineResistance',
  'mains.lineInductance',
  'mains.diode.forwardVoltage',
  'mains.diode.slopeResistance',
  'mains.limiter.kind',
  'mains.limiter.resistance',
  'mains.limiter.r25',
  'mains.limiter.beta',
  'mains.limiter.startTemperature',
  'mains.limiter.thermal.heatCapacity',
  'mains.limiter.thermal.dissipationConstant',
  'mains.limiter.bypass.delay',
];

const COLD = '25 °C';
const HOT = '110 °C';

export function MainsSection({
  draft,
  issues,
  readOnly,
  onField,
  onValue,
}: {
  draft: Draft;
  issues: DesignIssue[];
  readOnly?: boolean;
  onField: (path: string, text: string) => void;
  onValue: (path: string, value: unknown) => void;
}) {
  const theme = useTheme();
  const kind = (getIn(draft, 'mains.kind') as string | undefined) === 'three-phase' ? 'three-phase' : 'single-phase';
  const limiterKind = ((getIn(draft, 'mains.limiter.kind') as string | undefined) ?? 'none') as 'none' | 'resistor' | 'ntc';
  const start = String(getIn(draft, 'mains.limiter.startTemperature') ?? COLD);
  const startMode = start === HOT ? 'hot' : start === COLD ? 'cold' : 'other';
  const thermal = getIn(draft, 'mains.limiter.thermal') != null;
  const bypass = getIn(draft, 'mains.limiter.bypass') != null;
  const error = (path: string) => issues.find((i) => i.path === path)?.message;

  const unit = (path: string, label: string, dimension: Dimension, optional?: string) => (
    <View key={path} style={{ flexBasis: 200, flexGrow: 1, minWidth: 0 }}>
      <UnitField
        label={label}
        dimension={dimension}
        value={fieldText(getIn(draft, path), dimension)}
        onChangeText={(t) => onField(path, t)}
        readOnly={readOnly}
        error={error(path)}
        optional={optional !== undefined}
        emptyMeaning={optional}
        testID={`field-${path}`}
      />
    </View>
  );
  // Angles and temperatures are read by the mains engine itself ("90°", "25 °C", "3500 K").
  const text = (path: string, label: string, hint: string) => (
    <View key={path} style={{ flexBasis: 200, flexGrow: 1, minWidth: 0 }}>
      <TextField
        label={label}
        value={String(getIn(draft, path) ?? '')}
        onChangeText={(t) => onField(path, t)}
        editable={!readOnly}
        error={error(path)}
        hint={hint}
        mono
        testID={`field-${path}`}
      />
    </View>
  );
  const row = (children: React.ReactNode) => (
    <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.m }}>{children}</View>
  );
  const setLimiter = (next: 'none' | 'resistor' | 'ntc') => {
    if (readOnly || next === limiterKind) return;
    const keep = getIn(draft, 'mains.limiter.bypass');
    const base =
      next === 'none'
        ? { kind: 'none' }
        : next === 'resistor'
          ? { kind: 'resistor', resistance: '10 Ω' }
          : { kind: 'ntc', r25: '10 Ω', beta: '3500 K', startTemperature: COLD };
    onValue('mains.limiter', next !== 'none' && keep ? { ...base, bypass: keep } : base);
  };

  return (
    <Card
      title="Mains"
      subtitle="The AC supply switched on through a bridge rectifier, with the line's resistance and inductance and an inrush limiter."
      testID="group-mains"
    >
      <Segmented
        accessibilityLabel="Kind of mains supply"
        testID="mains-kind"
        value={kind}
        onChange={(v) => !readOnly && onValue('mains.kind', v)}
        options={[
          { value: 'single-phase', label: 'Single phase' },
          { value: 'three-phase', label: 'Three phase' },
        ]}
      />
      {row([
        unit('mains.voltage', kind === 'three-phase' ? 'RMS voltage, line to line' : 'RMS voltage', 'voltage'),
        unit('mains.frequency', 'Frequency', 'frequency', 'default 50 Hz'),
        text('mains.angle', 'Switch-on angle', '0° is the rising zero crossing; 90° the peak'),
        unit('mains.lineResistance', kind === 'three-phase' ? 'Line resistance, per line' : 'Line resistance, whole loop', 'resistance', '0 Ω'),
        unit('mains.lineInductance', kind === 'three-phase' ? 'Line inductance, per line' : 'Line inductance, whole loop', 'inductance', '0 H'),
        unit('mains.diode.forwardVoltage', 'Diode forward drop', 'voltage', '0 V (ideal)'),
        unit('mains.diode.slopeResistance', 'Diode slope resistance', 'resistance', '0 Ω (ideal)'),
      ])}
      <Segmented
        accessibilityLabel="Inrush limiter"
        testID="mains-limiter-kind"
        value={limiterKind}
        onChange={setLimiter}
        options={[
          { value: 'none', label: 'No limiter' },
          { value: 'resistor', label: 'Resistor' },
          { value: 'ntc', label: 'NTC thermistor' },
        ]}
      />
      {limiterKind === 'resistor' ? row([unit('mains.limiter.resistance', 'Limiter resistance', 'resistance')]) : null}
      {limiterKind === 'ntc' ? (
        <View style={{ gap: theme.space.m }}>
          {row([
            unit('mains.limiter.r25', 'NTC resistance at 25 °C (R25)', 'resistance'),
            text('mains.limiter.beta', 'β', 'in K, like "3500 K"'),
          ])}
          <Segmented
            accessibilityLabel="NTC start temperature"
            testID="mains-start-temperature"
            value={startMode === 'other' ? 'cold' : startMode}
            onChange={(v) => !readOnly && onValue('mains.limiter.startTemperature', v === 'hot' ? HOT : COLD)}
            options={[
              { value: 'cold', label: `Cold start, ${COLD}` },
              { value: 'hot', label: `Hot restart, ${HOT}` },
            ]}
          />
          {startMode === 'other' || error('mains.limiter.startTemperature')
            ? row([text('mains.limiter.startTemperature', 'Start temperature', '"25 °C", "298.15 K"')])
            : null}
          <Toggle
            label={thermal ? 'Self-heating (thermal model): on' : 'Self-heating (thermal model): off, held at the start temperature'}
            value={thermal}
            onChange={(v) =>
              !readOnly &&
              onValue('mains.limiter.thermal', v ? { heatCapacity: '1.2 J/K', dissipationConstant: '15 mW/K' } : undefined)
            }
            testID="fit-mains-thermal"
            disabled={readOnly}
          />
          {thermal
            ? row([
                text('mains.limiter.thermal.heatCapacity', 'Heat capacity', 'like "1.2 J/K"'),
                text('mains.limiter.thermal.dissipationConstant', 'Dissipation constant', 'like "15 mW/K"'),
              ])
            : null}
        </View>
      ) : null}
      {limiterKind !== 'none' ? (
        <View style={{ gap: theme.space.m }}>
          <Toggle
            label={bypass ? 'Relay bypass: fitted' : 'Relay bypass: not fitted'}
            value={bypass}
            onChange={(v) => !readOnly && onValue('mains.limiter.bypass', v ? { delay: '100 ms' } : undefined)}
            testID="fit-mains-bypass"
            disabled={readOnly}
          />
          {bypass ? row([unit('mains.limiter.bypass.delay', 'Relay closes after', 'time')]) : null}
        </View>
      ) : null}
    </Card>
  );
}
