// "Use a part" in the design editor: choose a slot (DC-link capacitor, precharge resistor, …) and a
// library part of the right kind; the server copies its values into the draft and remembers which
// part the slot came from. The editor's own copy is updated with the same values.
import { useState } from 'react';
import { ScrollView, View } from 'react-native';
import { getIn } from '@/components/designs/designForm';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { Text } from '@/components/ui/Text';
import { describeError } from '@/lib/api/client';
import { useApplyPart, useParts } from '@/lib/queries/bench';
import { useTheme } from '@/lib/theme';
import { PART_SLOT_KEYS, PART_SLOTS, type PartSlot } from '@/sim/parts';

export interface PartPickerProps {
  designId: string;
  teamId: string;
  /** Saves pending edits first, so that the server applies the part to the latest draft. */
  flush: () => Promise<void>;
  /** Writes one value into the editor's copy of the draft (undefined removes it). */
  setValue: (path: string, value: unknown) => void;
}

export function PartPicker({ designId, teamId, flush, setValue }: PartPickerProps) {
  const theme = useTheme();
  const [slot, setSlot] = useState<PartSlot>('capacitor');
  const kind = PART_SLOTS[slot].kind;
  const parts = useParts(teamId, '', kind);
  const apply = useApplyPart(designId);
  const [done, setDone] = useState<string | null>(null);

  const use = async (partId: string, partNumber: string) => {
    setDone(null);
    await flush();
    apply.mutate(
      { slot, partId },
      {
        onSuccess: (result) => {
          for (const path of result.written) setValue(path, getIn(result.draft as never, path));
          for (const path of result.cleared) setValue(path, undefined);
          setDone(`${partNumber} is the ${PART_SLOTS[slot].label.toLowerCase()} now: ${result.written.length} values written${result.cleared.length ? `, ${result.cleared.length} ratings it does not give removed` : ''}.`);
        },
      },
    );
  };

  return (
    <Card title="Use a part from the library" subtitle="Copies the part's values and ratings into this draft." testID="part-picker">
      <View style={{ gap: 12 }}>
        <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={{ gap: 8 }}>
          {PART_SLOT_KEYS.map((s) => (
            <Chip key={s} label={PART_SLOTS[s].label} selected={s === slot} onPress={() => setSlot(s)} testID={`part-slot-${s}`} />
          ))}
        </ScrollView>
        {parts.isPending ? (
          <Text muted>Loading parts…</Text>
        ) : parts.isError ? (
          <Text color={theme.color.danger}>{describeError(parts.error)}</Text>
        ) : parts.data.items.length === 0 ? (
          <Text muted>The library has no {kind} parts yet.</Text>
        ) : (
          <View style={{ gap: 8 }}>
            {parts.data.items.slice(0, 8).map((p) => (
              <View key={p.id} style={{ flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: 8 }}>
                <View style={{ flexShrink: 1 }}>
                  <Text mono weight="semibold">
                    {p.partNumber}
                  </Text>
                  {p.description ? (
                    <Text variant="caption" muted>
                      {p.description}
                    </Text>
                  ) : null}
                </View>
                <Button label="Use" variant="secondary" compact onPress={() => void use(p.id, p.partNumber)} busy={apply.isPending && apply.variables?.partId === p.id} accessibilityLabel={`Use ${p.partNumber} as the ${PART_SLOTS[slot].label.toLowerCase()}`} />
              </View>
            ))}
          </View>
        )}
        {apply.isError ? <Text color={theme.color.danger}>{describeError(apply.error)}</Text> : null}
        {done ? (
          <Text color={theme.color.status.pass} testID="part-picker-done">
            {done}
          </Text>
        ) : null}
      </View>
    </Card>
  );
}
