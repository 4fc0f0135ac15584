import { View } from 'react-native';
import Svg, { Circle, Path } from 'react-native-svg';
import { useTheme } from '@/lib/theme';

/** Ringwell's mark: a ring with a damped ripple settling inside it. */
export function Logo({ size = 28 }: { size?: number }) {
  const theme = useTheme();
  return (
    <View style={{ width: size, height: size, flexShrink: 0 }}>
      <Svg width={size} height={size} viewBox="0 0 32 32" aria-hidden accessibilityElementsHidden>
        <Circle cx="16" cy="16" r="13" stroke={theme.color.accent} strokeWidth={3} fill="none" />
        <Path
          d="M6 17 C8.5 8, 10.5 8, 12.5 17 S16 23, 18 16 S21.5 12.5, 23 16 S25 17.5, 26 16.5"
          stroke={theme.color.trace.current}
          strokeWidth={2}
          fill="none"
          strokeLinecap="round"
        />
      </Svg>
    </View>
  );
}
