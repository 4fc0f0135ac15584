import { useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { View } from 'react-native';
import { WaveformChart, type RatingLine } from '@/components/charts/WaveformChart';
import { fieldText, getIn, setIn, type Draft } from '@/components/designs/designForm';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Screen } from '@/components/ui/Screen';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { readQuantity, UnitField } from '@/components/ui/UnitField';
import { describeError, isApiError } from '@/lib/api/client';
import type { DesignDetail } from '@/lib/contracts';
import { useSnubberProposal, type SnubberAnswer } from '@/lib/queries/analyses';
import { can, useMe } from '@/lib/queries/auth';
import { useDesign, useUpdateDesign } from '@/lib/queries/designs';
import { useLayout, useTheme } from '@/lib/theme';
import { formatEng, type Dimension } from '@/sim/units';

const FIELDS: { key: string; label: string; dimension: Dimension; hint?: string }[] = [
  { key: 'f1', label: 'Ring frequency, bare (f1)', dimension: 'frequency', hint: 'Read off the scope at turn-off.' },
  { key: 'f2', label: 'Ring frequency with added C (f2)', dimension: 'frequency' },
  { key: 'addedCapacitance', label: 'Added capacitance', dimension: 'capacitance', hint: 'The capacitor soldered across the switch for f2.' },
  { key: 'switchingFrequency', label: 'Switching frequency', dimension: 'frequency' },
];

/** Starting values: the rings the design's own L and C would give, so the screen shows something; replace them with readings. */
function initialInputs(draft: Draft): Record<string, string> {
  const l = readQuantity(fieldText(getIn(draft, 'source.inductance'), 'inductance'), 'inductance');
  const c = readQuantity(fieldText(getIn(draft, 'capacitor.capacitance'), 'capacitance'), 'capacitance');
  if (l.ok === true && c.ok === true && l.value > 0 && c.value > 0) {
    const ring = (cap: number) => 1 / (2 * Math.PI * Math.sqrt(l.value * cap));
    return {
      f1: formatEng(ring(c.value), 'Hz', 3),
      f2: formatEng(ring(2 * c.value), 'Hz', 3),
      addedCapacitance: formatEng(c.value, 'F', 3),
      switchingFrequency: '50 kHz',
    };
  }
  return { f1: '', f2: '', addedCapacitance: '', switchingFrequency: '50 kHz' };
}

export function SnubberScreen({ id }: { id: string }) {
  const design = useDesign(id);
  if (design.isPending) return <Loading label="Opening the design" />;
  if (design.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={design.error} onRetry={() => design.refetch()} />
      </View>
    );
  return <Snubber key={design.data.id} design={design.data} />;
}

function Snubber({ design }: { design: DesignDetail }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const me = useMe();
  const mayEdit = can(me.data?.teams.find((t) => t.id === design.teamId)?.role, 'edit');
  const draft = useMemo(() => (design.draft ?? {}) as Draft, [design.draft]);
  const [inputs, setInputs] = useState<Record<string, string>>(() => initialInputs(draft));
  const proposal = useSnubberProposal();
  const update = useUpdateDesign(design.id);
  const [written, setWritten] = useState(false);

  const ready = FIELDS.every((f) => readQuantity(inputs[f.key] ?? '', f.dimension).ok === true);
  const mutate = proposal.mutate;
  useEffect(() => {
    if (!ready) return;
    const timer = setTimeout(() => mutate({ design: draft, options: { ...inputs } }), 400);
    return () => clearTimeout(timer);
  }, [ready, inputs, draft, mutate]);

  const fieldError = (key: string) => (isApiError(proposal.error) ? proposal.error.fieldMessage(key) : undefined);
  const result = proposal.data;
  const write = async (r: SnubberAnswer) => {
    const next = setIn(draft, 'damping', {
      resistance: formatEng(r.proposal.rs, 'Ω', 3),
      capacitance: formatEng(r.proposal.cs, 'F', 3),
    });
    await update.mutateAsync({ draft: next });
    setWritten(true);
  };

  return (
    <Screen
      title="Snubber"
      subtitle={`${design.name}: the loop inductance and node capacitance from two ring measurements, and the RC snubber they call for.`}
      testID="snubber-screen"
      actions={
        <Button label="Back to the design" icon="chevron-left" onPress={() => router.push(`/designs/${design.id}` as never)} testID="back-to-design" />
      }
    >
      <View style={{ flexDirection: layout.isWide ? 'row' : 'column', gap: theme.space.l, alignItems: 'flex-start' }}>
        <View style={{ width: layout.isWide ? 360 : '100%', gap: theme.space.m }}>
          <Card title="Two measurements" subtitle="Filled from the design’s L and C as a start; enter your readings.">
            {FIELDS.map((f) => (
              <UnitField
                key={f.key}
                label={f.label}
                dimension={f.dimension}
                value={inputs[f.key] ?? ''}
                onChangeText={(t) => setInputs((s) => ({ ...s, [f.key]: t }))}
                error={fieldError(f.key)}
                placeholder={f.hint}
                testID={`snubber-${f.key}`}
              />
            ))}
          </Card>
        </View>
        <View style={{ flex: 1, width: layout.isWide ? undefined : '100%', gap: theme.space.m, minWidth: 0 }}>
          {proposal.isError ? (
            <Card title="No proposal yet" testID="snubber-error">
              <Text color={theme.color.status.fail}>{describeError(proposal.error)}</Text>
            </Card>
          ) : null}
          {!result && proposal.isPending ? <Loading label="Proposing on the server" /> : null}
          {result ? <Proposal result={result} mayEdit={mayEdit} onWrite={() => write(result)} busy={update.isPending} /> : null}
          {written ? <Text testID="snubber-written">The working copy’s damping branch now holds the snubber.</Text> : null}
          {update.isError ? <Text color={theme.color.status.fail}>{describeError(update.error)}</Text> : null}
        </View>
      </View>
    </Screen>
  );
}

function Proposal({ result, mayEdit, onWrite, busy }: { result: SnubberAnswer; mayEdit: boolean; onWrite: () => void; busy: boolean }) {
  const theme = useTheme();
  const { parasitics, proposal, comparison } = result;
  const rating = comparison.before.summary.switchCheck;
  const lines: RatingLine[] =
    rating && rating.limit !== null
      ? [
          { panel: 'voltage', value: rating.limit, label: 'switch rating', status: 'fail' },
          ...(rating.deratedLimit !== null ? [{ panel: 'voltage' as const, value: rating.deratedLimit, label: 'derated', status: 'warn' as const }] : []),
        ]
      : [];
  const wave = (w: { t: number[]; v: number[]; i: number[] }) => ({ t: w.t, vC: [], v: w.v, i: w.i });
  return (
    <View style={{ gap: theme.space.m }}>
      <Card title="Proposed snubber" testID="snubber-proposal">
        <Text>
          Loop {formatEng(parasitics.lStray, 'H', 3)}, node {formatEng(parasitics.cParasitic, 'F', 3)}, √(L/C) {formatEng(parasitics.characteristicImpedance, 'Ω', 3)}.
        </Text>
        <Text variant="lead">
          Rs{' '}
          <Text mono weight="semibold" testID="snubber-rs">
            {formatEng(proposal.rs, 'Ω', 3)}
          </Text>
          , Cs{' '}
          <Text mono weight="semibold" testID="snubber-cs">
            {formatEng(proposal.cs, 'F', 3)}
          </Text>
        </Text>
        <Text>
          Resistor power {formatEng(proposal.resistorPower, 'W', 3)} at {formatEng(proposal.switchingFrequency, 'Hz')} and{' '}
          {formatEng(proposal.busVoltage, 'V')} ({formatEng(proposal.energyPerEdge, 'J', 3)} per edge).
        </Text>
        <Text testID="snubber-peaks">
          Peak switch voltage {formatEng(comparison.peakBefore, 'V', 4)} without, {formatEng(comparison.peakAfter, 'V', 4)} with the snubber
          {comparison.overshootReductionPercent !== null ? ` (${comparison.overshootReductionPercent.toFixed(0)} % of the overshoot removed)` : ''}.
        </Text>
        {mayEdit ? (
          <Button label="Write into the design" variant="primary" busy={busy} onPress={onWrite} testID="snubber-write" style={{ alignSelf: 'flex-start' }} />
        ) : null}
      </Card>
      <Card title="Turn-off without the snubber">
        <WaveformChart waveform={wave(comparison.before.waveform)} ratingLines={lines} testID="snubber-before-chart" />
      </Card>
      <Card title="Turn-off with the snubber">
        <WaveformChart waveform={wave(comparison.after.waveform)} ratingLines={lines} testID="snubber-after-chart" />
      </Card>
    </View>
  );
}
