export * from './tokens';
export { ThemeProvider, useTheme, useLayout, layoutFor, type Layout, type LayoutKind } from './ThemeProvider';
