import { QueryClientProvider } from '@tanstack/react-query';
import { useFonts } from 'expo-font';
import { DefaultTheme, Slot, ThemeProvider, type Theme as NavTheme } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useState } from 'react';
import { View } from 'react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { createQueryClient } from '@/components/queries/queryClient';
import { colors, fontAssets, ThemeProvider as TokensProvider } from '@/components/theme';

const navTheme: NavTheme = {
  ...DefaultTheme,
  colors: { ...DefaultTheme.colors, background: colors.powder, card: colors.surface, text: colors.ink, primary: colors.ember, border: colors.line },
};

export default function RootLayout() {
  const [queryClient] = useState(createQueryClient);
  const [fontsLoaded, fontError] = useFonts(fontAssets);

  return (
    <SafeAreaProvider>
      <QueryClientProvider client={queryClient}>
        <TokensProvider>
          <ThemeProvider value={navTheme}>
            <StatusBar style="dark" />
            {/* A font that fails to load falls back to the system face rather than blocking the app. */}
            {fontsLoaded || fontError ? <Slot /> : <View style={{ flex: 1, backgroundColor: colors.powder }} />}
          </ThemeProvider>
        </TokensProvider>
      </QueryClientProvider>
    </SafeAreaProvider>
  );
}
