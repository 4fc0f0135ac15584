import { useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { View } from 'react-native';
import { getIn, type Draft } from '@/components/designs/designForm';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { Screen } from '@/components/ui/Screen';
import { Segmented } from '@/components/ui/Segmented';
import { StatusBadge } from '@/components/ui/StatusBadge';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { UNIT_OF } from '@/components/ui/UnitField';
import { describeError, isApiError } from '@/lib/api/client';
import type { DesignDetail } from '@/lib/contracts';
import { useAnalysisJob, useCancelJob, useStartSpread } from '@/lib/queries/analyses';
import { can, useMe } from '@/lib/queries/auth';
import { useCreateDesign, useDesign } from '@/lib/queries/designs';
import { useLayout, useTheme } from '@/lib/theme';
import type { MetricSpread, SpreadComplete } from '@/sim/spread';
import { DC_TOLERANCE_PATHS, MAINS_ONLY_PATHS, MAINS_SHARED_PATHS, PATH_INFO, type TolerancePath } from '@/sim/spread/paths';
import { formatEng as eng } from '@/sim/units';
import { Histogram } from './Histogram';

/** A sampled value in engineering notation with its unit (a load value in whatever its kind is, unitless). */
function valueText(path: string, v: unknown): string {
  if (typeof v !== 'number') return String(v);
  const dim = PATH_INFO[path as TolerancePath]?.dimension;
  // Kelvin without prefixes: "3500 K", not "3.5 kK".
  if (dim === 'temperature') return `${Number(v.toPrecision(5))} K`;
  return dim && dim !== 'load' ? eng(v, UNIT_OF[dim], 4) : eng(v, '', 4);
}

const fmt = (v: number | null | undefined, unit: string) => {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  if (unit === '°') return `${v.toFixed(2)}°`;
  if (unit === 'K') return `${Number(v.toPrecision(4))} K`;
  return eng(v, unit);
};

interface Row {
  on: boolean;
  mode: 'percent' | 'range';
  percent: string;
  min: string;
  max: string;
  drift: string;
}

const DEFAULT_ON: Partial<Record<TolerancePath, Partial<Row>>> = {
  'source.voltage': { percent: '5' },
  'capacitor.capacitance': { percent: '10', drift: '-20' },
  'capacitor.esr': { percent: '20', drift: '100' },
  'filter.inductance': { percent: '10' },
  'precharge.resistance': { percent: '5' },
  'load.value': { percent: '10' },
  // Mains: ±10 % is the usual supply tolerance of a 230 V network; an inrush NTC's R25 is commonly
  // ±20 % and a wirewound limiter ±5 % (common practice; the user sets the part's own figure).
  'mains.voltage': { percent: '10' },
  'mains.limiter.r25': { percent: '20' },
  'mains.limiter.resistance': { percent: '5' },
};

/** The paths this design offers: a mains design (with a mains section) has its own. */
function pathsOf(draft: Draft): readonly TolerancePath[] {
  return getIn(draft, 'mains') != null ? [...MAINS_ONLY_PATHS, ...MAINS_SHARED_PATHS] : DC_TOLERANCE_PATHS;
}

function initialRows(draft: Draft): Partial<Record<TolerancePath, Row>> {
  const rows: Partial<Record<TolerancePath, Row>> = {};
  for (const path of pathsOf(draft)) {
    if (path.startsWith('initial.')) continue;
    if (getIn(draft, path) === undefined || getIn(draft, path) === null) continue;
    const d = DEFAULT_ON[path];
    rows[path] = { on: !!d, mode: 'percent', percent: d?.percent ?? '5', min: '', max: '', drift: d?.drift ?? '' };
  }
  return rows;
}

function tolerancesOf(rows: Partial<Record<TolerancePath, Row>>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [path, row] of Object.entries(rows) as [TolerancePath, Row][]) {
    if (!row.on) continue;
    const drift = PATH_INFO[path].drift && row.drift.trim() ? { drift: Number(row.drift) } : {};
    out[path] = row.mode === 'percent' ? { percent: Number(row.percent), ...drift } : { min: row.min.trim(), max: row.max.trim(), ...drift };
  }
  return out;
}

export function SpreadScreen({ id }: { id: string }) {
  const design = useDesign(id);
  if (design.isPending) return <Loading label="Opening the design" />;
  if (design.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={design.error} onRetry={() => design.refetch()} />
      </View>
    );
  return <Spread key={design.data.id} design={design.data} />;
}

function Spread({ design }: { design: DesignDetail }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const me = useMe();
  const mayRun = can(me.data?.teams.find((t) => t.id === design.teamId)?.role, 'edit');
  const revision = design.latestRevision;
  const draft = useMemo(() => (revision ? design.draft : design.draft ?? {}) as Draft, [design.draft, revision]);
  const [rows, setRows] = useState(() => initialRows(draft));
  const [method, setMethod] = useState<'corners' | 'monte-carlo'>('corners');
  const [samples, setSamples] = useState('2000');
  const [seed, setSeed] = useState('');
  const start = useStartSpread(revision?.id ?? null);
  const [jobId, setJobId] = useState<string | null>(null);
  const job = useAnalysisJob(jobId);
  const cancel = useCancelJob();
  const [cached, setCached] = useState<SpreadComplete | null>(null);
  const create = useCreateDesign();

  const run = async () => {
    setCached(null);
    setJobId(null);
    const options: Record<string, unknown> = { method, tolerances: tolerancesOf(rows) };
    if (method === 'monte-carlo') {
      options.samples = Number(samples);
      if (seed.trim()) options.seed = Number(seed);
    }
    const res = await start.mutateAsync(options);
    if (res.job) setJobId(res.job.id);
    else if (res.result) setCached(res.result);
  };

  const result: SpreadComplete | null = cached ?? job.data?.result?.result ?? null;
  const running = job.data && (job.data.state === 'queued' || job.data.state === 'running');
  const fieldError = (key: string) => (isApiError(start.error) ? start.error.fieldMessage(`options.${key}`) : undefined);

  const openCorner = async () => {
    if (!result?.worstCase) return;
    const created = await create.mutateAsync({
      projectId: design.projectId,
      name: `${design.name} — worst case`.slice(0, 120),
      draft: result.worstCase.design as never,
    });
    router.push(`/designs/${created.id}` as never);
  };

  return (
    <Screen
      title="Spread"
      subtitle={`${design.name}: every check over the parts’ tolerances, by corners or Monte Carlo.`}
      testID="spread-screen"
      actions={
        <Button label="Back to the design" icon="chevron-left" onPress={() => router.push(`/designs/${design.id}` as never)} testID="back-to-design" />
      }
    >
      {!revision ? (
        <Card title="Save a revision first">
          <Text>The spread runs on a saved revision, so that its result is kept with it. Save the design as a revision, then come back.</Text>
        </Card>
      ) : (
        <View style={{ flexDirection: layout.isWide ? 'row' : 'column', gap: theme.space.l, alignItems: 'flex-start' }}>
          <View style={{ width: layout.isWide ? 380 : '100%', gap: theme.space.m }}>
            <Card title="Tolerances" subtitle={`On revision r${revision.sequence}. Tick the values that spread.`} testID="spread-tolerances">
              {(Object.entries(rows) as [TolerancePath, Row][]).map(([path, row]) => {
                const set = (patch: Partial<Row>) => setRows((r) => ({ ...r, [path]: { ...row, ...patch } }));
                const info = PATH_INFO[path];
                return (
                  <View key={path} style={{ gap: theme.space.xs, borderTopWidth: 1, borderColor: theme.color.hairline, paddingTop: theme.space.s }}>
                    <View style={{ flexDirection: 'row', alignItems: 'center', gap: theme.space.s, flexWrap: 'wrap' }}>
                      <Chip label={row.on ? `✓ ${info.label}` : info.label} selected={row.on} onPress={() => set({ on: !row.on })} testID={`tol-${path}`} />
                      {row.on ? (
                        <Chip label={row.mode === 'percent' ? '± %' : 'min / max'} onPress={() => set({ mode: row.mode === 'percent' ? 'range' : 'percent' })} />
                      ) : null}
                    </View>
                    {row.on ? (
                      <View style={{ flexDirection: 'row', gap: theme.space.s, flexWrap: 'wrap' }}>
                        {row.mode === 'percent' ? (
                          <View style={{ flex: 1, minWidth: 120 }}>
                            <TextField label="± %" value={row.percent} onChangeText={(t) => set({ percent: t })} inputMode="decimal" error={fieldError(`tolerances.${path}.percent`)} />
                          </View>
                        ) : (
                          <>
                            <View style={{ flex: 1, minWidth: 120 }}>
                              <TextField label="Min" value={row.min} onChangeText={(t) => set({ min: t })} error={fieldError(`tolerances.${path}.min`)} />
                            </View>
                            <View style={{ flex: 1, minWidth: 120 }}>
                              <TextField label="Max" value={row.max} onChangeText={(t) => set({ max: t })} error={fieldError(`tolerances.${path}.max`)} />
                            </View>
                          </>
                        )}
                        {info.drift ? (
                          <View style={{ flex: 1, minWidth: 120 }}>
                            <TextField label="End-of-life drift %" value={row.drift} onChangeText={(t) => set({ drift: t })} inputMode="decimal" error={fieldError(`tolerances.${path}.drift`)} />
                          </View>
                        ) : null}
                      </View>
                    ) : null}
                    {fieldError(`tolerances.${path}`) ? <Text color={theme.color.status.fail}>{fieldError(`tolerances.${path}`)}</Text> : null}
                  </View>
                );
              })}
            </Card>
            <Card title="Method">
              <Segmented
                options={[
                  { value: 'corners', label: 'Corners' },
                  { value: 'monte-carlo', label: 'Monte Carlo' },
                ]}
                value={method}
                onChange={setMethod}
                accessibilityLabel="Spread method"
                testID="spread-method"
              />
              {method === 'monte-carlo' ? (
                <>
                  <TextField label="Samples (at most 100 000)" value={samples} onChangeText={setSamples} inputMode="numeric" error={fieldError('samples')} testID="spread-samples" />
                  <TextField label="Seed (empty: the default)" value={seed} onChangeText={setSeed} inputMode="numeric" error={fieldError('seed')} testID="spread-seed" />
                </>
              ) : (
                <Text variant="caption" muted>
                  Every combination of band ends: 2ⁿ runs for n toleranced values (at most 10).
                </Text>
              )}
              {fieldError('tolerances') ? <Text color={theme.color.status.fail}>{fieldError('tolerances')}</Text> : null}
              {mayRun ? (
                <Button label="Run the spread" variant="primary" busy={start.isPending} disabled={!!running} onPress={run} testID="spread-run" style={{ alignSelf: 'flex-start' }} />
              ) : (
                <Text muted>Viewers can read a spread but not start one.</Text>
              )}
              {start.isError ? <Text color={theme.color.status.fail} testID="spread-error">{describeError(start.error)}</Text> : null}
            </Card>
          </View>
          <View style={{ flex: 1, width: layout.isWide ? undefined : '100%', gap: theme.space.m, minWidth: 0 }}>
            {job.data ? (
              <Card
                title={running ? 'Running' : job.data.state === 'done' ? 'Done' : job.data.state === 'cancelled' ? 'Cancelled' : 'The spread failed'}
                testID="spread-progress"
              >
                <View
                  accessibilityRole="progressbar"
                  accessibilityValue={{ min: 0, max: job.data.total, now: job.data.done }}
                  style={{ height: 10, borderRadius: 5, backgroundColor: theme.color.hairline, overflow: 'hidden' }}
                >
                  <View style={{ height: 10, width: `${job.data.total ? (100 * job.data.done) / job.data.total : 0}%`, backgroundColor: theme.color.accent }} />
                </View>
                <Text mono testID="spread-progress-text">
                  {job.data.done} of {job.data.total} samples
                </Text>
                {job.data.error ? <Text color={theme.color.status.fail}>{job.data.error.message}</Text> : null}
                {running ? <Button label="Cancel" variant="danger" onPress={() => cancel.mutate(job.data!.id)} testID="spread-cancel" style={{ alignSelf: 'flex-start' }} /> : null}
              </Card>
            ) : null}
            {result ? <SpreadResultView result={result} onOpenCorner={mayRun ? openCorner : null} opening={create.isPending} /> : null}
            {create.isError ? <Text color={theme.color.status.fail}>{describeError(create.error)}</Text> : null}
          </View>
        </View>
      )}
    </Screen>
  );
}

function SpreadResultView({ result, onOpenCorner, opening }: { result: SpreadComplete; onOpenCorner: (() => void) | null; opening: boolean }) {
  const theme = useTheme();
  const layout = useLayout();
  const wc = result.worstCase;
  return (
    <View style={{ gap: theme.space.m }} testID="spread-result">
      <Card
        title="Worst case"
        right={<StatusBadge status={result.worstStatus} />}
        subtitle={`${result.samples} samples, ${result.method === 'corners' ? 'corners' : `Monte Carlo (${result.distribution}), seed ${result.seed}`}.`}
        testID="spread-worst"
      >
        {wc ? (
          <>
            <Text>
              {wc.label}: {fmt(wc.value, result.checks.find((c) => c.id === wc.checkId)?.unit ?? '')}, margin{' '}
              <Text mono weight="semibold">
                {wc.marginPercent.toFixed(1)} %
              </Text>
              , at:
            </Text>
            {Object.entries(wc.values).map(([path, v]) => (
              <Text key={path} mono variant="caption">
                {PATH_INFO[path as TolerancePath]?.label ?? path} = {valueText(path, v)}
              </Text>
            ))}
            {onOpenCorner ? (
              <Button label="Open this corner as a design" busy={opening} onPress={onOpenCorner} testID="spread-open-corner" style={{ alignSelf: 'flex-start' }} />
            ) : null}
          </>
        ) : (
          <Text muted>No check has a margin to compare.</Text>
        )}
        {result.invalid.count > 0 ? <Text color={theme.color.status.fail}>{result.invalid.count} samples could not run and count as fails.</Text> : null}
      </Card>
      {result.subject === 'mains' && result.mains ? <MainsMetrics result={result} /> : null}
      <Card title="Histograms" subtitle="Dashed lines: the part ratings.">
        <View style={{ flexDirection: layout.isWide ? 'row' : 'column', flexWrap: 'wrap', gap: theme.space.m }}>
          {result.histograms.map((h) => (
            <View key={h.key} style={{ width: layout.isWide ? '48%' : '100%' }}>
              <Histogram histogram={h} testID={`histogram-${h.key}`} />
            </View>
          ))}
        </View>
      </Card>
      <Card title="Margins by check" subtitle="Nominal and the worst over the samples." testID="spread-checks">
        {result.checks.map((c) => (
          <View
            key={c.id}
            style={{ flexDirection: 'row', alignItems: 'center', gap: theme.space.s, borderTopWidth: 1, borderColor: theme.color.hairline, paddingVertical: 6, flexWrap: 'wrap' }}
          >
            <StatusBadge status={c.worstStatus} />
            <Text style={{ flex: 1, minWidth: 140 }}>{c.label}</Text>
            <Text mono variant="caption">
              nominal {c.nominal.marginPercent === null ? '—' : `${c.nominal.marginPercent.toFixed(1)} %`} · worst{' '}
              {c.marginPercent ? `${c.marginPercent.min.toFixed(1)} %` : '—'}
            </Text>
          </View>
        ))}
      </Card>
    </View>
  );
}

/** The mains metrics a reviewer reads first, nominal and over the samples. */
const MAINS_TABLE = ['peakCurrent', 'switchOnAngle', 'surgeEquivalentCurrent', 'diodeI2t', 'i2t', 'limiterEnergy', 'peakCapacitorVoltage'];

function MainsMetrics({ result }: { result: SpreadComplete }) {
  const theme = useTheme();
  const mains = result.mains!;
  const rows = MAINS_TABLE.map((key) => result.metrics.find((m) => m.key === key)).filter(
    (m): m is MetricSpread => !!m && m.count > 0,
  );
  const check = mains.angleCheck[0];
  const how =
    mains.angleMode === 'search'
      ? `Each corner ran at its own worst switch-on angle (a ${mains.sweep.step}° sweep from ${mains.sweep.from}° to ${mains.sweep.to}°, refined).`
      : `Every sample ran at the nominal design's worst switch-on angle, ${mains.nominalAngle.toFixed(2)}°.` +
        (check
          ? ` Searched again, the largest inrush moves to ${check.searchedAngle.toFixed(2)}° and changes by ${Math.abs(check.differencePercent) < 0.001 ? 'under 0.001' : check.differencePercent.toPrecision(2)} %.`
          : '');
  return (
    <Card title="Inrush over the spread" subtitle={how} testID="spread-mains-metrics">
      {rows.map((m) => (
        <View
          key={m.key}
          style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s, borderTopWidth: 1, borderColor: theme.color.hairline, paddingVertical: 6 }}
          testID={`spread-metric-${m.key}`}
        >
          <Text style={{ flex: 1, minWidth: 160 }}>{m.label}</Text>
          <Text mono variant="caption">
            nominal {fmt(m.nominal, m.unit)} · {fmt(m.min, m.unit)} … {fmt(m.max, m.unit)}
          </Text>
        </View>
      ))}
    </Card>
  );
}
