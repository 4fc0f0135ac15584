import { useMemo } from 'react';
import { TextInput, View } from 'react-native';
import { DesignError } from '@/sim/errors';
import { formatEng, parseQuantity, type Dimension } from '@/sim/units';
import { useTheme } from '@/lib/theme';
import { textStyle, Text } from './Text';

export const UNIT_OF: Record<Dimension, string> = {
  voltage: 'V',
  current: 'A',
  resistance: 'Ω',
  inductance: 'H',
  capacitance: 'F',
  time: 's',
  power: 'W',
  energy: 'J',
  i2t: 'A²s',
  frequency: 'Hz',
  charge: 'C',
  temperature: 'K',
  ratio: '',
};

export type ParsedQuantity = { ok: true; value: number; text: string } | { ok: false; message: string } | { ok: 'empty' };

const sentence = (s: string) => (s ? s[0].toUpperCase() + s.slice(1) : s) + (/[.?]$/.test(s) ? '' : '.');

/** Reads what an engineer typed ("470µ", "4k7", "20 mΩ") in one dimension, without throwing. */
export function readQuantity(input: string, dimension: Dimension): ParsedQuantity {
  if (input.trim() === '') return { ok: 'empty' };
  try {
    const value = parseQuantity(input, dimension);
    const text = dimension === 'ratio' ? `${Number((value * 100).toPrecision(4))} %` : formatEng(value, UNIT_OF[dimension], 4);
    return { ok: true, value, text };
  } catch (error) {
    const message = error instanceof DesignError ? (error.issues[0]?.message ?? error.message) : String(error);
    return { ok: false, message: sentence(message) };
  }
}

export interface UnitFieldProps {
  label: string;
  dimension: Dimension;
  value: string;
  onChangeText: (text: string) => void;
  /** A problem found by validating the whole design (bounds, cross-checks), shown when parsing is fine. */
  error?: string;
  /** Empty is allowed (an optional rating, a default). */
  optional?: boolean;
  /** What an empty optional field means, such as "none" or "default 95 %". */
  emptyMeaning?: string;
  placeholder?: string;
  testID?: string;
  onBlur?: () => void;
  readOnly?: boolean;
  /** For screen readers when the visible label is short ("Factor" in a table row). */
  accessibilityLabel?: string;
}

/**
 * A quantity input that accepts what engineers type and shows, under it, what it understood in
 * engineering notation — or, in words, why it could not read it.
 */
export function UnitField({
  label,
  dimension,
  value,
  onChangeText,
  error,
  optional,
  emptyMeaning,
  placeholder,
  testID,
  onBlur,
  readOnly,
  accessibilityLabel,
}: UnitFieldProps) {
  const theme = useTheme();
  const c = theme.color;
  const parsed = useMemo(() => readQuantity(value, dimension), [value, dimension]);
  const problem =
    parsed.ok === false ? parsed.message : parsed.ok === 'empty' && !optional ? 'Required.' : error ? sentence(error) : undefined;
  const unit = UNIT_OF[dimension];
  return (
    <View style={{ gap: 4, minWidth: 0 }}>
      <View style={{ flexDirection: 'row', justifyContent: 'space-between', gap: 8 }}>
        <Text variant="caption" weight="semibold" muted numberOfLines={1} style={{ flexShrink: 1 }}>
          {label}
        </Text>
        <Text variant="caption" muted>
          {unit || (dimension === 'ratio' ? 'fraction or %' : '')}
        </Text>
      </View>
      <TextInput
        testID={testID}
        accessibilityLabel={accessibilityLabel ?? `${label}${unit ? `, in ${unit}` : ''}`}
        accessibilityHint={problem ?? (parsed.ok === true ? `Read as ${parsed.text}` : undefined)}
        aria-invalid={!!problem}
        value={value}
        onChangeText={onChangeText}
        onBlur={onBlur}
        editable={!readOnly}
        placeholder={placeholder ?? (optional ? (emptyMeaning ?? 'none') : undefined)}
        placeholderTextColor={c.mutedInk}
        autoCapitalize="none"
        autoCorrect={false}
        spellCheck={false}
        style={[
          textStyle(theme, 'lead', 'regular', true),
          {
            minHeight: theme.touchTarget,
            paddingHorizontal: theme.space.m,
            borderWidth: 1,
            borderRadius: theme.radius,
            borderColor: problem ? c.status.fail : c.hairline,
            backgroundColor: c.card,
            width: '100%',
          },
        ]}
      />
      {problem ? (
        <Text
          variant="caption"
          color={c.status.fail}
          testID={testID ? `${testID}-error` : undefined}
          accessibilityLiveRegion="polite"
        >
          {problem}
        </Text>
      ) : (
        <Text variant="caption" mono muted testID={testID ? `${testID}-parsed` : undefined} numberOfLines={1}>
          {parsed.ok === true ? `= ${parsed.text}` : emptyMeaning ? emptyMeaning : ' '}
        </Text>
      )}
    </View>
  );
}
