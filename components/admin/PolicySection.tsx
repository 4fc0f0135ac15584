import { useState } from 'react';
import { View } from 'react-native';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { readQuantity, UnitField } from '@/components/ui/UnitField';
import { stampText } from '@/components/ui/format';
import { describeError, isApiError } from '@/lib/api/client';
import { useDerating, usePutDerating } from '@/lib/queries/team';
import { useLayout, useTheme } from '@/lib/theme';
import { RATING_KEYS, type RatingKey } from '@/sim/design';
import { formatEng } from '@/sim/units';

interface Effective {
  factors: Record<RatingKey, { factor: number; source: string }>;
  discharge: { thresholdVoltage: number; allowedTime: number; exemptCharge: number; loadStaysConnected: boolean; source: string };
}

const LABEL: Record<RatingKey, string> = {
  capacitorVoltage: 'Capacitor voltage',
  capacitorSurgeVoltage: 'Capacitor surge voltage',
  inductorSaturationCurrent: 'Inductor saturation current',
  prechargePulseEnergy: 'Precharge pulse energy',
  prechargePeakPower: 'Precharge peak power',
  prechargeContinuousPower: 'Precharge continuous power',
  contactorMakeCurrent: 'Contactor making current',
  contactorCarryCurrent: 'Contactor carrying current',
  fuseMeltingI2t: 'Fuse melting I²t',
  diodeSurgeCurrent: 'Diode surge current',
  diodeI2t: 'Diode I²t',
  switchVoltage: 'Switch voltage',
  cableI2t: 'Cable I²t',
};

const pct = (f: number) => `${Number((f * 100).toPrecision(4))} %`;

/** The team's derating factors: every design's checks are judged against these. */
export function PolicySection({ isAdmin }: { isAdmin: boolean }) {
  const theme = useTheme();
  const layout = useLayout();
  const derating = useDerating();
  const put = usePutDerating();
  const [edits, setEdits] = useState<Partial<Record<RatingKey, string>>>({});
  if (derating.isPending) return <Loading label="Loading the derating policy" />;
  if (derating.isError) return <ErrorNotice error={derating.error} onRetry={() => derating.refetch()} />;
  const effective = derating.data.effective as Effective;
  const overrides = ((derating.data.policy as { factors?: Partial<Record<RatingKey, unknown>> } | null)?.factors ??
    {}) as Partial<Record<RatingKey, unknown>>;
  const dirty = Object.keys(edits).length > 0;
  const problems = Object.entries(edits).filter(([, t]) => t && readQuantity(t, 'ratio').ok === false);

  const save = () => {
    const current = (derating.data.policy as Record<string, unknown> | null) ?? {};
    const factors: Record<string, unknown> = { ...((current.factors as Record<string, unknown>) ?? {}) };
    for (const [key, text] of Object.entries(edits)) {
      if (!text || !text.trim()) delete factors[key];
      else {
        const r = readQuantity(text, 'ratio');
        if (r.ok === true) factors[key] = r.value;
      }
    }
    put.mutate({ policy: { ...current, factors } }, { onSuccess: () => setEdits({}) });
  };

  return (
    <Card
      title="Derating policy"
      subtitle={`How far below each rating parts are worked. ${derating.data.updatedAt ? `Changed ${stampText(derating.data.updatedAt)}.` : "The engine's defaults apply."}`}
      testID="policy"
    >
      {RATING_KEYS.map((key) => {
        const rule = effective.factors[key];
        const overridden = overrides[key] !== undefined;
        return (
          <View
            key={key}
            style={{
              flexDirection: layout.isNarrow ? 'column' : 'row',
              gap: theme.space.m,
              paddingVertical: theme.space.s,
              borderBottomWidth: 1,
              borderBottomColor: theme.color.hairline,
              alignItems: layout.isNarrow ? 'stretch' : 'center',
            }}
          >
            <View style={{ flex: 1 }}>
              <Text weight="semibold">{LABEL[key]}</Text>
              <Text variant="caption" muted>
                {overridden ? 'Team override' : 'Default'}: {rule.source}
              </Text>
            </View>
            {isAdmin ? (
              <View style={{ width: layout.isNarrow ? '100%' : 200 }}>
                <UnitField
                  label={`Factor for ${LABEL[key].toLowerCase()}`}
                  dimension="ratio"
                  value={edits[key] ?? pct(rule.factor)}
                  onChangeText={(t) => setEdits((e) => ({ ...e, [key]: t }))}
                  testID={`factor-${key}`}
                />
              </View>
            ) : (
              <Text mono>{pct(rule.factor)}</Text>
            )}
          </View>
        );
      })}
      <View style={{ gap: 2 }}>
        <Text weight="semibold">Discharge after disconnection</Text>
        <Text variant="caption" muted>
          Below {formatEng(effective.discharge.thresholdVoltage, 'V')} within {formatEng(effective.discharge.allowedTime, 's')};
          exempt at or below {formatEng(effective.discharge.exemptCharge, 'C')} stored.{' '}
          {effective.discharge.loadStaysConnected
            ? 'A resistive load counts as a discharge path.'
            : 'Only the bleeder counts as a discharge path.'}{' '}
          ({effective.discharge.source})
        </Text>
      </View>
      {isAdmin ? (
        <>
          {put.isError ? (
            <Text color={theme.color.status.fail} accessibilityRole="alert">
              {isApiError(put.error) && put.error.fields.length
                ? put.error.fields.map((f) => `${f.path}: ${f.message}`).join('; ')
                : describeError(put.error)}
            </Text>
          ) : null}
          <View style={{ flexDirection: 'row', gap: theme.space.s }}>
            <Button
              label="Save policy"
              variant="primary"
              disabled={!dirty || problems.length > 0}
              busy={put.isPending}
              onPress={save}
              testID="policy-save"
            />
            {dirty ? <Button label="Discard changes" variant="quiet" onPress={() => setEdits({})} /> : null}
          </View>
        </>
      ) : null}
    </Card>
  );
}
