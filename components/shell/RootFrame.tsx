import { useEffect, type ReactNode } from 'react';
import { ActivityIndicator, Platform, StyleSheet, View } from 'react-native';
import { webData } from '@/components/ui/webProps';
import { useTheme } from '@/lib/theme';

/**
 * The page behind every route: paper background, the shipped text face set on the document so that
 * anything not styled by a Text still reads in Inter, and a quiet wait until the fonts are in.
 */
export function RootFrame({ ready, children }: { ready: boolean; children: ReactNode }) {
  const theme = useTheme();
  useEffect(() => {
    if (Platform.OS !== 'web' || typeof document === 'undefined') return;
    const id = 'ringwell-base-style';
    let style = document.getElementById(id) as HTMLStyleElement | null;
    if (!style) {
      style = document.createElement('style');
      style.id = id;
      document.head.appendChild(style);
    }
    style.textContent = `html, body, #root { font-family: ${theme.fonts.regular}, system-ui, sans-serif; background: ${theme.color.paper}; color: ${theme.color.ink}; }
body { overflow-x: hidden; }
:focus-visible { outline: 2px solid ${theme.color.accent}; outline-offset: 2px; }`;
    document.documentElement.style.colorScheme = theme.scheme;
  }, [theme]);

  return (
    <View
      testID="app-root"
      {...webData({ font: theme.fonts.regular, fontsReady: ready ? 'yes' : 'no' })}
      style={[styles.root, { backgroundColor: theme.color.paper }]}
    >
      {ready ? (
        children
      ) : (
        <ActivityIndicator style={styles.wait} color={theme.color.accent} accessibilityLabel="Loading Ringwell" />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, minHeight: '100%' },
  wait: { marginTop: 96 },
});
