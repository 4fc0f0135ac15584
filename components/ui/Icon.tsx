// Ringwell's own glyphs, drawn with react-native-svg on a 24-unit grid with a 1.8 stroke. No icon
// font: headless browsers and offline installs render these exactly as drawn.
import { View } from 'react-native';
import Svg, { Circle, Line, Path, Polyline, Rect } from 'react-native-svg';
import { useTheme } from '@/lib/theme';

export type IconName =
  | 'designs'
  | 'parts'
  | 'reviews'
  | 'team'
  | 'mail'
  | 'pass'
  | 'warn'
  | 'fail'
  | 'not-checked'
  | 'chevron-down'
  | 'chevron-right'
  | 'chevron-left'
  | 'plus'
  | 'search'
  | 'download'
  | 'close'
  | 'user'
  | 'bolt'
  | 'history'
  | 'sizing'
  | 'menu';

export interface IconProps {
  name: IconName;
  size?: number;
  color?: string;
  /** Icons beside a word are decoration; give a label only when the icon stands alone. */
  label?: string;
}

export function Icon({ name, size = 20, color, label }: IconProps) {
  const theme = useTheme();
  const c = color ?? theme.color.ink;
  const stroke = { stroke: c, strokeWidth: 1.8, fill: 'none', strokeLinecap: 'round' as const, strokeLinejoin: 'round' as const };
  const a11y = label
    ? { accessible: true, accessibilityRole: 'image' as const, accessibilityLabel: label }
    : { accessibilityElementsHidden: true, importantForAccessibility: 'no-hide-descendants' as const, 'aria-hidden': true };
  return (
    // The fixed box keeps a flex row from squeezing the glyph to nothing beside long text.
    <View style={{ width: size, height: size, flexShrink: 0 }}>
      <Svg width={size} height={size} viewBox="0 0 24 24" {...a11y}>
        {glyph(name, stroke, c)}
      </Svg>
    </View>
  );
}

type Stroke = { stroke: string; strokeWidth: number; fill: string; strokeLinecap: 'round'; strokeLinejoin: 'round' };

function glyph(name: IconName, s: Stroke, c: string) {
  switch (name) {
    case 'designs': // a capacitor between two wires
      return (
        <>
          <Line x1="3" y1="12" x2="9.5" y2="12" {...s} />
          <Line x1="9.5" y1="6" x2="9.5" y2="18" {...s} />
          <Path d="M14.5 6 Q12.5 12 14.5 18" {...s} />
          <Line x1="13.6" y1="12" x2="21" y2="12" {...s} />
        </>
      );
    case 'parts': // a resistor body with leads
      return (
        <>
          <Line x1="2" y1="12" x2="6" y2="12" {...s} />
          <Rect x="6" y="8.5" width="12" height="7" rx="1.5" {...s} />
          <Line x1="18" y1="12" x2="22" y2="12" {...s} />
          <Line x1="10" y1="8.5" x2="10" y2="15.5" {...s} />
          <Line x1="14" y1="8.5" x2="14" y2="15.5" {...s} />
        </>
      );
    case 'reviews': // a sheet with a tick
      return (
        <>
          <Path d="M6 3h9l4 4v14H6z" {...s} />
          <Polyline points="9,13 11.5,15.5 16,10.5" {...s} />
        </>
      );
    case 'team':
      return (
        <>
          <Circle cx="9" cy="8.5" r="3.2" {...s} />
          <Path d="M3.5 19.5c0-3.2 2.5-5.3 5.5-5.3s5.5 2.1 5.5 5.3" {...s} />
          <Circle cx="16.5" cy="9.5" r="2.5" {...s} />
          <Path d="M15.8 14.4c2.6-.3 4.7 1.5 4.7 4.6" {...s} />
        </>
      );
    case 'mail':
      return (
        <>
          <Rect x="3" y="5.5" width="18" height="13" rx="1.5" {...s} />
          <Polyline points="3.5,7 12,13 20.5,7" {...s} />
        </>
      );
    case 'pass':
      return <Polyline points="5,12.5 10,17.5 19,7" {...s} strokeWidth={2.4} />;
    case 'warn':
      return (
        <>
          <Path d="M12 3.5 21.5 20h-19z" {...s} strokeWidth={2} />
          <Line x1="12" y1="9.5" x2="12" y2="14" {...s} strokeWidth={2} />
          <Circle cx="12" cy="17" r="1.1" fill={c} />
        </>
      );
    case 'fail':
      return (
        <>
          <Line x1="6" y1="6" x2="18" y2="18" {...s} strokeWidth={2.4} />
          <Line x1="18" y1="6" x2="6" y2="18" {...s} strokeWidth={2.4} />
        </>
      );
    case 'not-checked':
      return <Line x1="6" y1="12" x2="18" y2="12" {...s} strokeWidth={2.4} />;
    case 'chevron-down':
      return <Polyline points="6,9 12,15 18,9" {...s} />;
    case 'chevron-right':
      return <Polyline points="9,6 15,12 9,18" {...s} />;
    case 'chevron-left':
      return <Polyline points="15,6 9,12 15,18" {...s} />;
    case 'plus':
      return (
        <>
          <Line x1="12" y1="5" x2="12" y2="19" {...s} />
          <Line x1="5" y1="12" x2="19" y2="12" {...s} />
        </>
      );
    case 'search':
      return (
        <>
          <Circle cx="10.5" cy="10.5" r="6" {...s} />
          <Line x1="15" y1="15" x2="20" y2="20" {...s} />
        </>
      );
    case 'download':
      return (
        <>
          <Line x1="12" y1="4" x2="12" y2="15" {...s} />
          <Polyline points="7.5,10.5 12,15 16.5,10.5" {...s} />
          <Line x1="5" y1="19.5" x2="19" y2="19.5" {...s} />
        </>
      );
    case 'close':
      return (
        <>
          <Line x1="6" y1="6" x2="18" y2="18" {...s} />
          <Line x1="18" y1="6" x2="6" y2="18" {...s} />
        </>
      );
    case 'user':
      return (
        <>
          <Circle cx="12" cy="8.5" r="3.5" {...s} />
          <Path d="M5 20c0-3.8 3.1-6 7-6s7 2.2 7 6" {...s} />
        </>
      );
    case 'bolt':
      return <Path d="M13 2.5 5 13.5h6l-1 8 8-11h-6z" {...s} />;
    case 'history':
      return (
        <>
          <Path d="M4.5 12a7.5 7.5 0 1 0 2.2-5.3" {...s} />
          <Polyline points="4,4.5 4.5,8 8,7.5" {...s} />
          <Polyline points="12,8 12,12 15,14" {...s} />
        </>
      );
    case 'sizing': // a resistor over a range bracket
      return (
        <>
          <Rect x="7" y="4" width="10" height="6" rx="1.2" {...s} />
          <Line x1="3" y1="7" x2="7" y2="7" {...s} />
          <Line x1="17" y1="7" x2="21" y2="7" {...s} />
          <Polyline points="4,17 4,20 20,20 20,17" {...s} />
          <Line x1="9" y1="14" x2="9" y2="20" {...s} />
          <Line x1="15" y1="14" x2="15" y2="20" {...s} />
        </>
      );
    case 'menu':
      return (
        <>
          <Line x1="4" y1="7" x2="20" y2="7" {...s} />
          <Line x1="4" y1="12" x2="20" y2="12" {...s} />
          <Line x1="4" y1="17" x2="20" y2="17" {...s} />
        </>
      );
  }
}
