import { forwardRef } from 'react';
import { TextInput, View, type TextInputProps } from 'react-native';
import { useTheme } from '@/lib/theme';
import { textStyle, Text } from './Text';

export interface TextFieldProps extends Omit<TextInputProps, 'style'> {
  label: string;
  error?: string;
  hint?: string;
  mono?: boolean;
  testID?: string;
  multiline?: boolean;
}

/** A labelled text input with its error in words under it. */
export const TextField = forwardRef<TextInput, TextFieldProps>(function TextField(
  { label, error, hint, mono, testID, multiline, ...rest },
  ref,
) {
  const theme = useTheme();
  const c = theme.color;
  return (
    <View style={{ gap: 4 }}>
      <Text variant="caption" weight="semibold" muted>
        {label}
      </Text>
      <TextInput
        ref={ref}
        testID={testID}
        accessibilityLabel={rest.accessibilityLabel ?? label}
        aria-invalid={!!error}
        placeholderTextColor={c.mutedInk}
        multiline={multiline}
        {...rest}
        style={[
          textStyle(theme, 'lead', 'regular', mono),
          {
            minHeight: multiline ? 88 : theme.touchTarget,
            paddingHorizontal: theme.space.m,
            paddingVertical: theme.space.s,
            borderWidth: 1,
            borderRadius: theme.radius,
            borderColor: error ? c.status.fail : c.hairline,
            backgroundColor: c.card,
            textAlignVertical: multiline ? 'top' : 'center',
          },
        ]}
      />
      {error ? (
        <Text variant="caption" color={c.status.fail} accessibilityRole="alert">
          {error}
        </Text>
      ) : hint ? (
        <Text variant="caption" muted>
          {hint}
        </Text>
      ) : null}
    </View>
  );
});
