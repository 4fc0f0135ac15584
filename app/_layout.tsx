import { Inter_400Regular } from '@expo-google-fonts/inter/400Regular';
import { Inter_600SemiBold } from '@expo-google-fonts/inter/600SemiBold';
import { JetBrainsMono_400Regular } from '@expo-google-fonts/jetbrains-mono/400Regular';
import { QueryClientProvider } from '@tanstack/react-query';
import { useFonts } from 'expo-font';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useState } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { RootFrame } from '@/components/shell/RootFrame';
import { makeQueryClient } from '@/lib/queries/queryClient';
import { ThemeProvider } from '@/lib/theme';

export default function RootLayout() {
  const [fontsLoaded, fontError] = useFonts({ Inter_400Regular, Inter_600SemiBold, JetBrainsMono_400Regular });
  const [queryClient] = useState(makeQueryClient);
  return (
    <SafeAreaProvider>
      <QueryClientProvider client={queryClient}>
        <ThemeProvider>
          <StatusBar style="auto" />
          <RootFrame ready={fontsLoaded || fontError !== null}>
            <Slot />
          </RootFrame>
        </ThemeProvider>
      </QueryClientProvider>
    </SafeAreaProvider>
  );
}
