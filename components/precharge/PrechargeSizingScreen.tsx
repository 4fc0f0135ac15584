import { useRouter } from 'expo-router';
import { useEffect, useMemo, useRef, useState } from 'react';
import { ScrollView, View } from 'react-native';
import { FeasibleWindowChart } from '@/components/charts/FeasibleWindowChart';
import { fieldText, getIn, setIn, type Draft } from '@/components/designs/designForm';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { Icon } from '@/components/ui/Icon';
import { Screen } from '@/components/ui/Screen';
import { StatusBadge } from '@/components/ui/StatusBadge';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { readQuantity, UnitField } from '@/components/ui/UnitField';
import { describeError, isApiError } from '@/lib/api/client';
import type { DesignDetail } from '@/lib/contracts';
import { can, useMe } from '@/lib/queries/auth';
import { useDesign, useUpdateDesign } from '@/lib/queries/designs';
import { usePrechargeSizing, type PrechargeCandidate, type PrechargeSizing } from '@/lib/queries/precharge';
import { useLayout, useTheme } from '@/lib/theme';
import type { Dimension } from '@/sim/units';
import { formatEng } from '@/sim/units';

interface InputSpec {
  key: string;
  label: string;
  dimension: Dimension;
  optional?: boolean;
  emptyMeaning?: string;
}

const INPUTS: InputSpec[] = [
  { key: 'busVoltage', label: 'Bus voltage', dimension: 'voltage' },
  { key: 'busVoltageTolerance', label: 'Bus voltage tolerance', dimension: 'ratio', optional: true, emptyMeaning: '0 %' },
  { key: 'capacitance', label: 'DC-link capacitance', dimension: 'capacitance' },
  { key: 'capacitanceTolerance', label: 'Capacitance tolerance', dimension: 'ratio', optional: true, emptyMeaning: '0 %' },
  { key: 'maxInrushCurrent', label: 'Largest allowed inrush', dimension: 'current' },
  { key: 'maxPrechargeTime', label: 'Longest allowed precharge', dimension: 'time' },
  { key: 'bypassThreshold', label: 'Bypass closes at', dimension: 'ratio' },
  { key: 'contactorDelay', label: 'Contactor delay', dimension: 'time', optional: true, emptyMeaning: '0 s' },
  { key: 'resistorTolerance', label: 'Resistor tolerance', dimension: 'ratio', optional: true, emptyMeaning: '5 %' },
];

function initialInputs(draft: Draft): Record<string, string> {
  const q = (path: string, dim: Dimension, fallback: string) => {
    const text = fieldText(getIn(draft, path), dim);
    return text || fallback;
  };
  return {
    busVoltage: q('source.voltage', 'voltage', ''),
    busVoltageTolerance: '5 %',
    capacitance: q('capacitor.capacitance', 'capacitance', ''),
    capacitanceTolerance: '20 %',
    maxInrushCurrent: q('ratings.diodeSurgeCurrent', 'current', '40 A'),
    maxPrechargeTime: '2 s',
    bypassThreshold: q('precharge.bypass.fraction', 'ratio', '95 %'),
    contactorDelay: q('precharge.bypass.delay', 'time', ''),
    resistorTolerance: '5 %',
    attempts: '3',
  };
}

export function PrechargeSizingScreen({ id }: { id: string }) {
  const design = useDesign(id);
  if (design.isPending) return <Loading label="Opening the design" />;
  if (design.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={design.error} onRetry={() => design.refetch()} />
      </View>
    );
  return <Sizing key={design.data.id} design={design.data} />;
}

function Sizing({ design }: { design: DesignDetail }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const me = useMe();
  const mayEdit = can(me.data?.teams.find((t) => t.id === design.teamId)?.role, 'edit');
  const draft = useMemo(() => (design.draft ?? {}) as Draft, [design.draft]);
  const [inputs, setInputs] = useState<Record<string, string>>(() => initialInputs(draft));
  const [series, setSeries] = useState<('E12' | 'E24')[]>(['E12', 'E24']);
  const sizing = usePrechargeSizing();
  const update = useUpdateDesign(design.id);
  const [applied, setApplied] = useState<{ resistance: number; extended: { from: number; to: number } | null } | null>(null);

  const localErrors = useMemo(() => {
    const out: Record<string, string> = {};
    for (const spec of INPUTS) {
      const text = inputs[spec.key] ?? '';
      const r = readQuantity(text, spec.dimension);
      if (r.ok === false) out[spec.key] = r.message;
      else if (r.ok === 'empty' && !spec.optional) out[spec.key] = 'Required.';
    }
    if (!/^\d+$/.test(inputs.attempts.trim()) || Number(inputs.attempts) < 1) out.attempts = 'A whole number, at least 1.';
    return out;
  }, [inputs]);

  const request = useMemo(() => {
    const body: Record<string, unknown> = { series, design: draft, attempts: Number(inputs.attempts) || 1 };
    for (const spec of INPUTS) {
      const text = (inputs[spec.key] ?? '').trim();
      if (text) body[spec.key] = text;
    }
    const r = getIn(draft, 'precharge.resistance');
    if (r !== undefined && r !== null) {
      body.chosenResistor = {
        resistance: r,
        ...(getIn(draft, 'ratings.prechargePulseEnergy') != null
          ? { pulseEnergy: getIn(draft, 'ratings.prechargePulseEnergy') }
          : {}),
        ...(getIn(draft, 'ratings.prechargePeakPower') != null ? { peakPower: getIn(draft, 'ratings.prechargePeakPower') } : {}),
      };
    }
    return body;
  }, [inputs, series, draft]);

  // Ask the server again shortly after the inputs settle, when they read correctly.
  const mutate = sizing.mutate;
  const ready = Object.keys(localErrors).length === 0;
  const lastSent = useRef('');
  useEffect(() => {
    if (!ready) return;
    const key = JSON.stringify(request);
    if (key === lastSent.current) return;
    const timer = setTimeout(() => {
      lastSent.current = key;
      mutate(request);
    }, 400);
    return () => clearTimeout(timer);
  }, [ready, request, mutate]);

  const serverField = (key: string) => (isApiError(sizing.error) ? sizing.error.fieldMessage(key) : undefined);

  const use = async (resistance: number) => {
    const value = formatEng(resistance, 'Ω', 4);
    let next = draft;
    if (getIn(next, 'precharge') == null)
      next = setIn(next, 'precharge', { resistance: value, bypass: { when: 'voltage', fraction: 0.95 } });
    else next = setIn(next, 'precharge.resistance', value);
    // A larger resistor charges more slowly: make the run long enough to include the bypass closing
    // and the second inrush after it, or the checks on them would read "not checked".
    const candidate = sizing.data?.candidates.find((c) => c.resistance === resistance);
    const closes = candidate?.simulated?.prechargeTime ?? candidate?.estimate.prechargeTime ?? null;
    const duration = numberOf(fieldText(getIn(draft, 'duration'), 'time'), 'time');
    let extended: { from: number; to: number } | null = null;
    if (closes !== null && Number.isFinite(duration) && duration < closes * 1.5) {
      const to = niceAbove(closes * 1.5);
      next = setIn(next, 'duration', formatEng(to, 's'));
      extended = { from: duration, to };
    }
    await update.mutateAsync({ draft: next });
    setApplied({ resistance, extended });
  };

  const result = sizing.data;
  const windowInputs = {
    maxInrushCurrent: numberOf(inputs.maxInrushCurrent, 'current'),
    maxPrechargeTime: numberOf(inputs.maxPrechargeTime, 'time'),
    bypassThreshold: numberOf(inputs.bypassThreshold, 'ratio'),
    contactorDelay: numberOf(inputs.contactorDelay, 'time') || 0,
  };

  return (
    <Screen
      title="Precharge sizing"
      subtitle={`${design.name}: the resistance window between the inrush limit and the time limit, and the standard values inside it.`}
      testID="precharge-screen"
      actions={
        <Button
          label="Back to the design"
          icon="chevron-left"
          onPress={() => router.push(`/designs/${design.id}` as never)}
          testID="back-to-design"
        />
      }
    >
      {applied !== null ? (
        <Card testID="precharge-applied">
          <View style={{ flexDirection: 'row', alignItems: 'center', gap: theme.space.s, flexWrap: 'wrap' }}>
            <Icon name="pass" size={18} color={theme.color.status.pass} />
            <Text style={{ flexShrink: 1 }}>
              The design’s precharge resistor is now {formatEng(applied.resistance, 'Ω', 4)}.
              {applied.extended
                ? ` The run is now ${formatEng(applied.extended.to, 's')} instead of ${formatEng(applied.extended.from, 's')}, so that it includes the bypass closing.`
                : ''}{' '}
              The working copy is saved; open the design to see the new transient.
            </Text>
          </View>
          <Button
            label="Open the design"
            variant="primary"
            onPress={() => router.push(`/designs/${design.id}` as never)}
            testID="open-design-after-apply"
            style={{ alignSelf: 'flex-start' }}
          />
        </Card>
      ) : null}

      {/* On a phone the window chart comes first, the inputs under it. */}
      <View style={{ flexDirection: layout.isWide ? 'row' : 'column-reverse', gap: theme.space.l, alignItems: 'flex-start' }}>
        <View style={{ width: layout.isWide ? 360 : '100%', gap: theme.space.m }}>
          <Card title="Limits and tolerances" subtitle="Filled from the design; change them to explore.">
            {INPUTS.map((spec) => (
              <UnitField
                key={spec.key}
                label={spec.label}
                dimension={spec.dimension}
                value={inputs[spec.key] ?? ''}
                onChangeText={(t) => setInputs((s) => ({ ...s, [spec.key]: t }))}
                optional={spec.optional}
                emptyMeaning={spec.emptyMeaning}
                error={serverField(spec.key)}
                testID={`sizing-${spec.key}`}
              />
            ))}
            <TextField
              label="Back-to-back attempts"
              value={inputs.attempts}
              onChangeText={(t) => setInputs((s) => ({ ...s, attempts: t }))}
              inputMode="numeric"
              error={localErrors.attempts}
              hint="A fault-retry scheme may precharge this many times without cooling."
              testID="sizing-attempts"
            />
            <View style={{ flexDirection: 'row', gap: theme.space.s, alignItems: 'center' }}>
              <Text variant="caption" weight="semibold" muted>
                Standard values
              </Text>
              {(['E12', 'E24'] as const).map((s) => (
                <Chip
                  key={s}
                  label={s}
                  selected={series.includes(s)}
                  onPress={() =>
                    setSeries((cur) => (cur.includes(s) ? (cur.length > 1 ? cur.filter((x) => x !== s) : cur) : [...cur, s]))
                  }
                />
              ))}
            </View>
          </Card>
        </View>

        <View style={{ flex: 1, width: layout.isWide ? undefined : '100%', gap: theme.space.m, minWidth: 0 }}>
          {sizing.isError && !isApiError(sizing.error) ? (
            <ErrorNotice error={sizing.error} onRetry={() => mutate(request)} />
          ) : null}
          {sizing.isError && isApiError(sizing.error) ? (
            <Card title="The sizing could not run">
              <Text color={theme.color.status.fail}>{describeError(sizing.error)}</Text>
            </Card>
          ) : null}
          {!result && sizing.isPending ? <Loading label="Sizing on the server" /> : null}
          {result ? (
            <SizingResult
              result={result}
              windowInputs={windowInputs}
              mayEdit={mayEdit}
              onUse={use}
              busy={update.isPending}
              current={numberOf(String(getIn(draft, 'precharge.resistance') ?? ''), 'resistance')}
              stale={sizing.isPending}
            />
          ) : null}
          {update.isError ? (
            <Text color={theme.color.status.fail} accessibilityRole="alert">
              {describeError(update.error)}
            </Text>
          ) : null}
        </View>
      </View>
    </Screen>
  );
}

/** The 1-2-5 round number at or above x. */
function niceAbove(x: number): number {
  const e = Math.floor(Math.log10(x));
  const f = x / 10 ** e;
  const m = f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10;
  return m * 10 ** e;
}

function numberOf(text: string, dim: Dimension): number {
  const r = readQuantity(text, dim);
  return r.ok === true ? r.value : NaN;
}

function SizingResult({
  result,
  windowInputs,
  mayEdit,
  onUse,
  busy,
  current,
  stale,
}: {
  result: PrechargeSizing;
  windowInputs: { maxInrushCurrent: number; maxPrechargeTime: number; bypassThreshold: number; contactorDelay: number };
  mayEdit: boolean;
  onUse: (r: number) => void;
  busy: boolean;
  current: number;
  stale: boolean;
}) {
  const theme = useTheme();
  const layout = useLayout();
  const showChart = [windowInputs.maxInrushCurrent, windowInputs.maxPrechargeTime, windowInputs.bypassThreshold].every((v) =>
    Number.isFinite(v),
  );
  return (
    <View style={{ gap: theme.space.m, opacity: stale ? 0.6 : 1 }}>
      <Card title="Feasible window" subtitle={result.explanation} testID="feasible-window">
        {showChart ? <FeasibleWindowChart result={result} inputs={windowInputs} /> : null}
        {result.reason ? (
          <Text color={theme.color.status.fail} testID="sizing-reason">
            {result.reason}
          </Text>
        ) : null}
        {result.recommended !== null ? (
          <Text testID="sizing-recommended">
            Recommended:{' '}
            <Text mono weight="semibold">
              {formatEng(result.recommended, 'Ω')}
            </Text>
            , the value with the most room to both limits.
          </Text>
        ) : null}
        {result.notes.map((n, k) => (
          <Text key={k} variant="caption" muted>
            {n}
          </Text>
        ))}
      </Card>
      <Card
        title="Standard values in the window"
        subtitle={`First order and re-simulated by the engine at ${formatEng(result.simulationCorner.busVoltage, 'V')} and ${formatEng(result.simulationCorner.capacitance, 'F')}.`}
        testID="candidates"
      >
        {result.candidates.length === 0 ? (
          <Text muted>No E12 or E24 value fits inside the window with the resistor’s tolerance.</Text>
        ) : layout.isNarrow ? (
          <CandidateList result={result} current={current} mayEdit={mayEdit} onUse={onUse} busy={busy} />
        ) : (
          <CandidateTable
            candidates={result.candidates}
            recommended={result.recommended}
            current={current}
            mayEdit={mayEdit}
            onUse={onUse}
            busy={busy}
          />
        )}
      </Card>
    </View>
  );
}

/** On a phone: the recommended value first, the rest on request. */
function CandidateList({
  result,
  current,
  mayEdit,
  onUse,
  busy,
}: {
  result: PrechargeSizing;
  current: number;
  mayEdit: boolean;
  onUse: (r: number) => void;
  busy: boolean;
}) {
  const theme = useTheme();
  const [all, setAll] = useState(false);
  const recommended = result.candidates.filter((c) => c.resistance === result.recommended);
  const others = result.candidates.filter((c) => c.resistance !== result.recommended);
  const shown = all ? [...recommended, ...others] : recommended.length ? recommended : others.slice(0, 3);
  return (
    <View style={{ gap: theme.space.s }}>
      {shown.map((c) => (
        <CandidateBlock
          key={`${c.series}${c.resistance}`}
          c={c}
          recommended={c.resistance === result.recommended}
          current={current}
          mayEdit={mayEdit}
          onUse={onUse}
          busy={busy}
        />
      ))}
      {result.candidates.length > shown.length || all ? (
        <Button
          label={all ? 'Show the recommended value only' : `Show all ${result.candidates.length} values`}
          variant="quiet"
          onPress={() => setAll((v) => !v)}
          testID="candidates-toggle"
        />
      ) : null}
    </View>
  );
}

const fmt = (v: number | null | undefined, unit: string) =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : formatEng(v, unit);

function CandidateBlock({
  c,
  recommended,
  current,
  mayEdit,
  onUse,
  busy,
}: {
  c: PrechargeCandidate;
  recommended: boolean;
  current: number;
  mayEdit: boolean;
  onUse: (r: number) => void;
  busy: boolean;
}) {
  const theme = useTheme();
  const within = c.simulatedWithinLimits;
  return (
    <View
      testID={`candidate-${c.resistance}`}
      style={{
        borderWidth: recommended ? 2 : 1,
        borderColor: recommended ? theme.color.accent : theme.color.hairline,
        borderRadius: theme.radius,
        padding: theme.space.m,
        gap: 6,
      }}
    >
      <View style={{ flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: theme.space.s }}>
        <Text mono weight="semibold" variant="lead">
          {formatEng(c.resistance, 'Ω')}{' '}
          <Text variant="caption" muted>
            {c.series}
          </Text>
        </Text>
        {within === null ? <StatusBadge status="not-checked" /> : <StatusBadge status={within ? 'pass' : 'fail'} />}
      </View>
      {recommended ? <Chip label="recommended" tone="accent" /> : null}
      <Text variant="caption" muted>
        First order: {fmt(c.estimate.prechargeTime, 's')}, {fmt(c.estimate.peakCurrent, 'A')},{' '}
        {fmt(c.estimate.energyPerAttempt, 'J')}, {fmt(c.estimate.peakPower, 'W')}
      </Text>
      <Text variant="caption">
        Engine: {fmt(c.simulated?.prechargeTime, 's')}, {fmt(c.simulated?.peakCurrent, 'A')},{' '}
        {fmt(c.simulated?.energyPerAttempt, 'J')}, {fmt(c.simulated?.peakPower, 'W')}
      </Text>
      {mayEdit ? (
        <Button
          label={Math.abs(current - c.resistance) < 1e-9 * c.resistance ? 'In the design' : 'Use this value'}
          disabled={Math.abs(current - c.resistance) < 1e-9 * c.resistance}
          busy={busy}
          onPress={() => onUse(c.resistance)}
          accessibilityLabel={`Use ${formatEng(c.resistance, 'Ω')} in the design`}
          testID={`use-${c.resistance}`}
        />
      ) : null}
    </View>
  );
}

const COLS = [
  { t: 'Value', w: 96 },
  { t: 'Time', w: 84 },
  { t: 'Peak i', w: 84 },
  { t: 'Energy', w: 84 },
  { t: 'Pulse power', w: 96 },
  { t: 'Time', w: 84 },
  { t: 'Peak i', w: 84 },
  { t: 'Energy', w: 84 },
  { t: 'Pulse power', w: 96 },
  { t: 'Limits', w: 90 },
  { t: '', w: 150 },
];

function CandidateTable({
  candidates,
  recommended,
  current,
  mayEdit,
  onUse,
  busy,
}: {
  candidates: PrechargeCandidate[];
  recommended: number | null;
  current: number;
  mayEdit: boolean;
  onUse: (r: number) => void;
  busy: boolean;
}) {
  const theme = useTheme();
  const cell = (text: string, w: number, k: number, opts: { mono?: boolean; muted?: boolean; weight?: 'semibold' } = {}) => (
    <View key={k} role="cell" style={{ width: w, paddingHorizontal: 6, paddingVertical: 8, justifyContent: 'center' }}>
      <Text mono={opts.mono} muted={opts.muted} weight={opts.weight} align={k === 0 ? 'left' : 'right'} variant="body">
        {text}
      </Text>
    </View>
  );
  return (
    <ScrollView horizontal>
      <View role="table" accessibilityLabel="Standard values with first-order and re-simulated figures">
        <View style={{ flexDirection: 'row' }}>
          <View style={{ width: COLS[0].w }} />
          <View
            style={{
              width: COLS.slice(1, 5).reduce((a, c) => a + c.w, 0),
              borderBottomWidth: 2,
              borderBottomColor: theme.color.hairline,
              paddingHorizontal: 6,
            }}
          >
            <Text variant="caption" weight="semibold" muted align="center">
              First order
            </Text>
          </View>
          <View
            style={{
              width: COLS.slice(5, 9).reduce((a, c) => a + c.w, 0),
              borderBottomWidth: 2,
              borderBottomColor: theme.color.accent,
              paddingHorizontal: 6,
            }}
          >
            <Text variant="caption" weight="semibold" color={theme.color.accent} align="center">
              Re-simulated by the engine
            </Text>
          </View>
        </View>
        <View role="row" style={{ flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: theme.color.hairline }}>
          {COLS.map((c, k) => (
            <View key={k} role="columnheader" style={{ width: c.w, paddingHorizontal: 6, paddingVertical: 6 }}>
              <Text variant="caption" weight="semibold" muted align={k === 0 ? 'left' : 'right'}>
                {c.t}
              </Text>
            </View>
          ))}
        </View>
        {candidates.map((c) => {
          const isRec = c.resistance === recommended;
          const inDesign = Math.abs(current - c.resistance) < 1e-9 * c.resistance;
          return (
            <View
              key={`${c.series}${c.resistance}`}
              role="row"
              testID={`candidate-${c.resistance}`}
              style={{
                flexDirection: 'row',
                alignItems: 'center',
                borderBottomWidth: 1,
                borderBottomColor: theme.color.hairline,
                backgroundColor: isRec ? theme.color.accentSoft : undefined,
              }}
            >
              {cell(`${formatEng(c.resistance, 'Ω')} ${c.series}${isRec ? ' ★' : ''}`, COLS[0].w, 0, {
                mono: true,
                weight: 'semibold',
              })}
              {cell(fmt(c.estimate.prechargeTime, 's'), COLS[1].w, 1, { mono: true, muted: true })}
              {cell(fmt(c.estimate.peakCurrent, 'A'), COLS[2].w, 2, { mono: true, muted: true })}
              {cell(fmt(c.estimate.energyPerAttempt, 'J'), COLS[3].w, 3, { mono: true, muted: true })}
              {cell(fmt(c.estimate.peakPower, 'W'), COLS[4].w, 4, { mono: true, muted: true })}
              {cell(fmt(c.simulated?.prechargeTime, 's'), COLS[5].w, 5, { mono: true })}
              {cell(fmt(c.simulated?.peakCurrent, 'A'), COLS[6].w, 6, { mono: true })}
              {cell(fmt(c.simulated?.energyPerAttempt, 'J'), COLS[7].w, 7, { mono: true })}
              {cell(fmt(c.simulated?.peakPower, 'W'), COLS[8].w, 8, { mono: true })}
              <View role="cell" style={{ width: COLS[9].w, paddingHorizontal: 6, alignItems: 'flex-end' }}>
                {c.simulatedWithinLimits === null ? (
                  <StatusBadge status="not-checked" size="caption" />
                ) : (
                  <StatusBadge status={c.simulatedWithinLimits ? 'pass' : 'fail'} size="caption" />
                )}
              </View>
              <View role="cell" style={{ width: COLS[10].w, paddingHorizontal: 6, paddingVertical: 4 }}>
                {mayEdit ? (
                  <Button
                    compact
                    label={inDesign ? 'In the design' : 'Use this value'}
                    disabled={inDesign}
                    busy={busy}
                    onPress={() => onUse(c.resistance)}
                    accessibilityLabel={`Use ${formatEng(c.resistance, 'Ω')} in the design`}
                    testID={`use-${c.resistance}`}
                  />
                ) : null}
              </View>
            </View>
          );
        })}
      </View>
    </ScrollView>
  );
}
