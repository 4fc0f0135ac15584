import { createContext, useContext, useMemo, type ReactNode } from 'react';
import { useColorScheme, useWindowDimensions } from 'react-native';
import { breakpoints, makeTheme, type Theme } from './tokens';

const ThemeContext = createContext<Theme>(makeTheme('light'));

export function ThemeProvider({ children, scheme }: { children: ReactNode; scheme?: 'light' | 'dark' }) {
  const system = useColorScheme();
  const chosen = scheme ?? (system === 'dark' ? 'dark' : 'light');
  const theme = useMemo(() => makeTheme(chosen), [chosen]);
  return <ThemeContext.Provider value={theme}>{children}</ThemeContext.Provider>;
}

export function useTheme(): Theme {
  return useContext(ThemeContext);
}

export type LayoutKind = 'narrow' | 'medium' | 'wide';

export interface Layout {
  kind: LayoutKind;
  width: number;
  height: number;
  isNarrow: boolean;
  isWide: boolean;
}

export function layoutFor(width: number, height = 0): Layout {
  const kind: LayoutKind = width <= breakpoints.narrowMax ? 'narrow' : width >= breakpoints.wideMin ? 'wide' : 'medium';
  return { kind, width, height, isNarrow: kind === 'narrow', isWide: kind === 'wide' };
}

/** Which layout the window is in now; re-renders when the window crosses a breakpoint. */
export function useLayout(): Layout {
  const { width, height } = useWindowDimensions();
  return layoutFor(width, height);
}
