// Ringwell's one theme: colours (light and dark), spacing, type scale, radius, breakpoints and
// font families. Every screen takes its look from here (see shared DESIGN.md); nothing else in the
// app writes a colour or a font name.

export type StatusKind = 'pass' | 'warn' | 'fail' | 'not-checked';

export interface Palette {
  ink: string;
  mutedInk: string;
  paper: string;
  card: string;
  hairline: string;
  accent: string;
  accentSoft: string;
  onAccent: string;
  danger: string;
  dangerSoft: string;
  status: Record<StatusKind, string>;
  statusSoft: Record<StatusKind, string>;
  trace: { capacitorVoltage: string; busVoltage: string; current: string; resistorPower: string; measured: string };
  shadow: string;
  scrim: string;
}

export const light: Palette = {
  ink: '#1B2430',
  mutedInk: '#5A6473',
  paper: '#F7F5F0',
  card: '#FFFFFF',
  hairline: '#E2DED6',
  accent: '#2F5D8A',
  accentSoft: '#E3ECF5',
  onAccent: '#FFFFFF',
  danger: '#B3261E',
  dangerSoft: '#FBEAE8',
  status: { pass: '#2E7D4F', warn: '#B7791F', fail: '#B3261E', 'not-checked': '#6B7280' },
  statusSoft: { pass: '#E6F2EA', warn: '#FBF1DE', fail: '#FBEAE8', 'not-checked': '#EFF0F2' },
  trace: {
    capacitorVoltage: '#2F5D8A',
    busVoltage: '#7A4FA3',
    current: '#C0562B',
    resistorPower: '#3E8E7E',
    measured: '#8A8F98',
  },
  shadow: 'rgba(27, 36, 48, 0.08)',
  scrim: 'rgba(27, 36, 48, 0.35)',
};

// Dark: ink and paper swap, accents lifted one step so that they keep their contrast.
export const dark: Palette = {
  ink: '#E8E6E1',
  mutedInk: '#A3A9B3',
  paper: '#14181F',
  card: '#1C212A',
  hairline: '#2E3440',
  accent: '#6F9BC8',
  accentSoft: '#22354A',
  onAccent: '#0E1218',
  danger: '#E06A60',
  dangerSoft: '#3A1F1D',
  status: { pass: '#5FB07F', warn: '#DDA54A', fail: '#E06A60', 'not-checked': '#9AA1AC' },
  statusSoft: { pass: '#1C3326', warn: '#3A2E18', fail: '#3A1F1D', 'not-checked': '#262B33' },
  trace: {
    capacitorVoltage: '#6F9BC8',
    busVoltage: '#A882CC',
    current: '#E08055',
    resistorPower: '#6DBBA9',
    measured: '#8A8F98',
  },
  shadow: 'rgba(0, 0, 0, 0.4)',
  scrim: 'rgba(0, 0, 0, 0.55)',
};

export const space = { xs: 4, s: 8, m: 12, l: 16, xl: 24, xxl: 32 } as const;

export const typeScale = { caption: 12, body: 14, lead: 16, title: 20, display: 28 } as const;

export const lineHeight = { caption: 16, body: 20, lead: 24, title: 28, display: 36 } as const;

export const radius = 6;

/** Narrow (phone) at or below 600 px, wide at or above 1024 px; between is a compact rail. */
export const breakpoints = { narrowMax: 600, wideMin: 1024 } as const;

/** The shipped fonts, loaded by app/_layout.tsx under these names. */
export const fonts = {
  regular: 'Inter_400Regular',
  semibold: 'Inter_600SemiBold',
  mono: 'JetBrainsMono_400Regular',
} as const;

/** Smallest touch target on a phone. */
export const touchTarget = 44;

export interface Theme {
  scheme: 'light' | 'dark';
  color: Palette;
  space: typeof space;
  type: typeof typeScale;
  lineHeight: typeof lineHeight;
  radius: number;
  fonts: typeof fonts;
  touchTarget: number;
}

export function makeTheme(scheme: 'light' | 'dark'): Theme {
  return {
    scheme,
    color: scheme === 'dark' ? dark : light,
    space,
    type: typeScale,
    lineHeight,
    radius,
    fonts,
    touchTarget,
  };
}
