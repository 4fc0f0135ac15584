import { useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { View } from 'react-native';
import { getIn, setIn, type Draft } from '@/components/designs/designForm';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Screen } from '@/components/ui/Screen';
import { StatusBadge } from '@/components/ui/StatusBadge';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { describeError } from '@/lib/api/client';
import type { DesignDetail } from '@/lib/contracts';
import { useStability, type StabilityAnswer } from '@/lib/queries/analyses';
import { can, useMe } from '@/lib/queries/auth';
import { useDesign, useUpdateDesign } from '@/lib/queries/designs';
import { useLayout, useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';
import { ImpedanceChart } from './ImpedanceChart';

export function StabilityScreen({ id }: { id: string }) {
  const design = useDesign(id);
  if (design.isPending) return <Loading label="Opening the design" />;
  if (design.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={design.error} onRetry={() => design.refetch()} />
      </View>
    );
  return <Stability key={design.data.id} design={design.data} />;
}

function Stability({ design }: { design: DesignDetail }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const me = useMe();
  const mayEdit = can(me.data?.teams.find((t) => t.id === design.teamId)?.role, 'edit');
  const draft = useMemo(() => (design.draft ?? {}) as Draft, [design.draft]);
  const [nText, setNText] = useState('4');
  const n = Number(nText);
  const nValid = Number.isFinite(n) && n > 0 && n <= 100;
  const stability = useStability();
  const update = useUpdateDesign(design.id);
  const [written, setWritten] = useState(false);
  const mutate = stability.mutate;
  useEffect(() => {
    if (!nValid) return;
    const timer = setTimeout(() => mutate({ design: draft, options: { dampingRatio: n } }), 300);
    return () => clearTimeout(timer);
  }, [draft, n, nValid, mutate]);

  const result = stability.data;
  const write = async (r: StabilityAnswer) => {
    let next = setIn(draft, 'damping', getIn(draft, 'damping') ?? {});
    next = setIn(next, 'damping.resistance', formatEng(r.damping.rd, 'Ω', 3));
    next = setIn(next, 'damping.capacitance', formatEng(r.damping.cd, 'F', 3));
    await update.mutateAsync({ draft: next });
    setWritten(true);
  };

  return (
    <Screen
      title="Stability"
      subtitle={`${design.name}: the input filter against its constant-power load (Middlebrook), and the damping that fixes it.`}
      testID="stability-screen"
      actions={
        <Button label="Back to the design" icon="chevron-left" onPress={() => router.push(`/designs/${design.id}` as never)} testID="back-to-design" />
      }
    >
      {stability.isError ? (
        <Card title="The stability analysis could not run" testID="stability-error">
          <Text color={theme.color.status.fail}>{describeError(stability.error)}</Text>
        </Card>
      ) : null}
      {!result && stability.isPending ? <Loading label="Analysing on the server" /> : null}
      {result ? (
        <View style={{ flexDirection: layout.isWide ? 'row' : 'column', gap: theme.space.l, alignItems: 'flex-start' }}>
          <View style={{ flex: layout.isWide ? 3 : undefined, width: layout.isWide ? undefined : '100%', gap: theme.space.m, minWidth: 0 }}>
            <Card
              title="Verdict"
              right={<StatusBadge status={result.stable && result.marginDb >= result.recommendedMarginDb ? 'pass' : result.stable ? 'warn' : 'fail'} />}
              testID="stability-verdict"
            >
              <Text>{result.verdict}</Text>
              <Text>
                Margin{' '}
                <Text mono weight="semibold" testID="stability-margin">
                  {result.marginDb.toFixed(1)} dB
                </Text>{' '}
                (usual practice: at least {result.recommendedMarginDb} dB), tightest at {formatEng(result.tightest.f, 'Hz')}.
              </Text>
            </Card>
            <Card title="Output impedance against the load" subtitle="Log-log. The filter’s |Zout| must stay well under |Zin|.">
              <ImpedanceChart f={result.impedance.f} zout={result.impedance.zout} zin={result.impedance.zin} tightest={result.tightest} />
            </Card>
          </View>
          <View style={{ flex: layout.isWide ? 2 : undefined, width: layout.isWide ? undefined : '100%', gap: theme.space.m, minWidth: 0 }}>
            <Card title="Eigenvalues" subtitle={`Linearised at ${formatEng(result.operatingPoint.v, 'V')}, ${formatEng(result.power, 'W')}.`} testID="eigenvalues">
              {result.modes.map((m, k) => (
                <View key={k} style={{ flexDirection: 'row', justifyContent: 'space-between', gap: theme.space.s, flexWrap: 'wrap' }}>
                  <Text mono>
                    {formatEng(m.eigenvalue.re, '')} {m.eigenvalue.im >= 0 ? '+' : '−'} j{formatEng(Math.abs(m.eigenvalue.im), '')} s⁻¹
                  </Text>
                  <Text mono muted>
                    ζ {m.zeta.toFixed(3)}
                    {m.frequency > 0 ? `, ${formatEng(m.frequency, 'Hz')}` : ''}
                  </Text>
                </View>
              ))}
            </Card>
            <Card title="Damping helper" subtitle="An Rd–Cd branch across the capacitor: Cd = n·C, Rd for the flattest peak." testID="damping-helper">
              <TextField
                label="n (Cd / C)"
                value={nText}
                onChangeText={setNText}
                inputMode="decimal"
                error={nValid ? undefined : 'A number above 0, at most 100.'}
                testID="damping-n"
              />
              <Text>
                Rd{' '}
                <Text mono weight="semibold" testID="damping-rd">
                  {formatEng(result.damping.rd, 'Ω', 3)}
                </Text>
                , Cd{' '}
                <Text mono weight="semibold" testID="damping-cd">
                  {formatEng(result.damping.cd, 'F', 3)}
                </Text>
                ; peak |Zout| {formatEng(result.damping.peakZout, 'Ω')} at {formatEng(result.damping.peakFrequency, 'Hz')}.
              </Text>
              {mayEdit ? (
                <Button
                  label="Write into the design"
                  variant="primary"
                  busy={update.isPending}
                  onPress={() => write(result)}
                  testID="damping-write"
                  style={{ alignSelf: 'flex-start' }}
                />
              ) : null}
              {written ? <Text testID="damping-written">The working copy’s damping branch is updated.</Text> : null}
              {update.isError ? <Text color={theme.color.status.fail}>{describeError(update.error)}</Text> : null}
            </Card>
          </View>
        </View>
      ) : null}
    </Screen>
  );
}
