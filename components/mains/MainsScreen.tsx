// The mains power-up screen (issue 9): peak inrush against switch-on angle with the worst angle
// marked, and the NTC's cold start against a hot restart, each at its own worst angle.
import { useRouter } from 'expo-router';
import { View } from 'react-native';
import { AngleSweepChart } from '@/components/charts/AngleSweepChart';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Screen } from '@/components/ui/Screen';
import { StatusBadge } from '@/components/ui/StatusBadge';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { describeError, isApiError } from '@/lib/api/client';
import type { DesignDetail } from '@/lib/contracts';
import { useDesign } from '@/lib/queries/designs';
import { useMainsColdHot, useMainsSweep, type MainsCase, type MainsColdHot } from '@/lib/queries/mains';
import { useLayout, useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

export function MainsScreen({ id }: { id: string }) {
  const design = useDesign(id);
  if (design.isPending) return <Loading label="Opening the design" />;
  if (design.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={design.error} onRetry={() => design.refetch()} />
      </View>
    );
  return <Mains key={design.data.id} design={design.data} />;
}

function Failure({ error, title, onRetry }: { error: unknown; title: string; onRetry: () => void }) {
  const theme = useTheme();
  if (!isApiError(error)) return <ErrorNotice error={error} onRetry={onRetry} />;
  return (
    <Card title={title}>
      <Text color={theme.color.status.fail}>{describeError(error)}</Text>
    </Card>
  );
}

function Mains({ design }: { design: DesignDetail }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const draft = design.draft as { mains?: { limiter?: { kind?: string } } } | null;
  const isMains = !!draft && typeof draft === 'object' && 'mains' in draft;
  const hasNtc = draft?.mains?.limiter?.kind === 'ntc';
  const sweep = useMainsSweep(isMains ? draft : null);
  const coldHot = useMainsColdHot(draft, isMains && hasNtc);

  return (
    <Screen
      title="Mains power-up"
      subtitle={`${design.name}: the peak inrush at every switch-on angle, and a cold start against a hot restart of the NTC.`}
      testID="mains-screen"
      actions={
        <Button label="Back to the design" icon="chevron-left" onPress={() => router.push(`/designs/${design.id}` as never)} testID="back-to-design" />
      }
    >
      {!isMains ? (
        <Card title="Not a mains design">
          <Text>This design has no mains section: it starts from a DC source, so there is no switch-on angle to sweep.</Text>
        </Card>
      ) : (
        <View style={{ flexDirection: layout.isWide ? 'row' : 'column', gap: theme.space.l, alignItems: 'flex-start' }}>
          <View style={{ flex: layout.isWide ? 3 : undefined, width: layout.isWide ? undefined : '100%', minWidth: 0, gap: theme.space.m }}>
            <Card title="Switch-on angle" subtitle="Peak inrush current against the angle of the mains at switch-on (0° is the rising zero crossing).">
              {sweep.isPending ? <Loading label="Sweeping the switch-on angle on the server" /> : null}
              {sweep.isError ? <Failure error={sweep.error} title="The sweep could not run" onRetry={() => sweep.refetch()} /> : null}
              {sweep.data ? (
                <View style={{ gap: theme.space.s }}>
                  <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.l }} testID="sweep-worst">
                    <Figure label="Worst angle" value={`${sweep.data.worst.angle.toFixed(1)}°`} />
                    <Figure label="Peak inrush there" value={formatEng(sweep.data.worst.peakCurrent, 'A')} />
                    <Figure label="Line I²t there" value={formatEng(sweep.data.worst.i2t, 'A²s')} />
                  </View>
                  <AngleSweepChart sweep={sweep.data} />
                </View>
              ) : null}
            </Card>
          </View>
          <View style={{ flex: layout.isWide ? 2 : undefined, width: layout.isWide ? undefined : '100%', minWidth: 0, gap: theme.space.m }}>
            <Card
              title="Cold start and hot restart"
              subtitle="The NTC at 25 °C and still hot at 110 °C, each at its own worst switch-on angle."
              testID="cold-hot-card"
            >
              {!hasNtc ? (
                <Text muted>The limiter is not an NTC, so its resistance does not depend on how recently it ran.</Text>
              ) : null}
              {hasNtc && coldHot.isPending ? <Loading label="Comparing cold and hot on the server" /> : null}
              {coldHot.isError ? (
                <Failure error={coldHot.error} title="The comparison could not run" onRetry={() => coldHot.refetch()} />
              ) : null}
              {coldHot.data ? <ColdHotTable data={coldHot.data} /> : null}
            </Card>
          </View>
        </View>
      )}
    </Screen>
  );
}

function Figure({ label, value }: { label: string; value: string }) {
  return (
    <View>
      <Text variant="caption" muted>
        {label}
      </Text>
      <Text variant="lead" mono weight="semibold">
        {value}
      </Text>
    </View>
  );
}

const celsius = (kelvin: number) => `${(kelvin - 273.15).toFixed(0)} °C`;

function ColdHotTable({ data }: { data: MainsColdHot }) {
  const theme = useTheme();
  const check = (c: MainsCase, id: string) => c.checks.find((k) => k.id === id);
  const surgeLimit = check(data.cold, 'diode-surge-current')?.limit ?? null;
  const rows: { label: string; value: (c: MainsCase) => string; status?: string }[] = [
    { label: 'NTC at start', value: (c) => formatEng(c.limiterResistance, 'Ω') },
    { label: 'Worst angle', value: (c) => `${c.angle.toFixed(1)}°` },
    { label: 'Peak inrush', value: (c) => formatEng(c.metrics.peakCurrent.value, 'A') },
    { label: 'Line I²t', value: (c) => formatEng(c.metrics.i2t, 'A²s'), status: 'fuse-i2t' },
    { label: 'Limiter energy', value: (c) => formatEng(c.metrics.limiterEnergy, 'J') },
    { label: 'Diode surge (half-sine equiv.)', value: (c) => formatEng(c.metrics.surgeEquivalentCurrent, 'A'), status: 'diode-surge-current' },
    { label: 'Diode I²t', value: (c) => formatEng(c.metrics.diodeI2t, 'A²s'), status: 'diode-i2t' },
  ];
  const cell = { flex: 1, minWidth: 0, gap: 2 } as const;
  return (
    <View testID="cold-hot-table" style={{ gap: theme.space.s }}>
      <View style={{ flexDirection: 'row', gap: theme.space.s, borderBottomWidth: 1, borderColor: theme.color.hairline, paddingBottom: theme.space.xs }}>
        <View style={{ flex: 1.2 }} />
        <Text variant="caption" weight="semibold" style={cell}>{`Cold, ${celsius(data.cold.startTemperature)}`}</Text>
        <Text variant="caption" weight="semibold" style={cell}>{`Hot, ${celsius(data.hot.startTemperature)}`}</Text>
      </View>
      {rows.map((row) => (
        <View key={row.label} style={{ flexDirection: 'row', gap: theme.space.s, alignItems: 'flex-start' }}>
          <Text variant="caption" muted style={{ flex: 1.2 }}>
            {row.label}
          </Text>
          {[data.cold, data.hot].map((c, k) => {
            const status = row.status ? check(c, row.status)?.status : undefined;
            return (
              <View key={k} style={cell}>
                <Text mono>{row.value(c)}</Text>
                {status ? <StatusBadge status={status} size="caption" /> : null}
              </View>
            );
          })}
        </View>
      ))}
      <Text variant="caption" muted>
        {`The surge equivalent is the one ${formatEng(data.surgePulseDuration, 's')} half-sine with the worst diode pulse’s I²t (I = √(2·I²t/t)), compared with IFSM${surgeLimit !== null ? ` (${formatEng(surgeLimit, 'A')})` : ''}.`}
      </Text>
    </View>
  );
}
