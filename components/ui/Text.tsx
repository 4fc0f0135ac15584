import type { ReactNode } from 'react';
import { Text as RNText, type TextProps, type TextStyle, type StyleProp } from 'react-native';
import { useTheme, type Theme } from '@/lib/theme';

export type TextVariant = 'caption' | 'body' | 'lead' | 'title' | 'display';

export interface AppTextProps extends TextProps {
  variant?: TextVariant;
  weight?: 'regular' | 'semibold';
  /** Monospaced digits for numbers that line up in tables and readouts. */
  mono?: boolean;
  muted?: boolean;
  color?: string;
  align?: TextStyle['textAlign'];
  style?: StyleProp<TextStyle>;
  children?: ReactNode;
}

export function textStyle(
  theme: Theme,
  variant: TextVariant = 'body',
  weight: 'regular' | 'semibold' = 'regular',
  mono = false,
): TextStyle {
  return {
    fontFamily: mono ? theme.fonts.mono : weight === 'semibold' ? theme.fonts.semibold : theme.fonts.regular,
    fontSize: theme.type[variant],
    lineHeight: theme.lineHeight[variant],
    color: theme.color.ink,
  };
}

/** Every piece of text in the app goes through here, so that it is set in the shipped faces. */
export function Text({
  variant = 'body',
  weight,
  mono = false,
  muted = false,
  color,
  align,
  style,
  children,
  ...rest
}: AppTextProps) {
  const theme = useTheme();
  const w = weight ?? (variant === 'title' || variant === 'display' ? 'semibold' : 'regular');
  return (
    <RNText
      {...rest}
      style={[
        textStyle(theme, variant, w, mono),
        muted && { color: theme.color.mutedInk },
        color ? { color } : null,
        align ? { textAlign: align } : null,
        style,
      ]}
    >
      {children}
    </RNText>
  );
}
