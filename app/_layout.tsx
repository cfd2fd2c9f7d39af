import { useState } from 'react';
import { Platform } from 'react-native';
import { Stack } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useFonts } from 'expo-font';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { PublicSans_400Regular } from '@expo-google-fonts/public-sans/400Regular';
import { PublicSans_500Medium } from '@expo-google-fonts/public-sans/500Medium';
import { PublicSans_600SemiBold } from '@expo-google-fonts/public-sans/600SemiBold';
import { PublicSans_700Bold } from '@expo-google-fonts/public-sans/700Bold';
import { color } from '../components/theme';
import { shouldRetryRead } from '../components/data/api';
import { prefetchFirstScreen } from '../components/data/first-screen';
import { SessionSync } from '../components/session-sync';
import { useFocusRing } from '../components/focus-ring';

const newQueryClient = () => new QueryClient({ defaultOptions: { queries: { staleTime: 15_000, refetchOnWindowFocus: true, retry: shouldRetryRead } } });

/**
 * On the web, one client for the page, made when this module loads (the router loads it before it
 * renders anything): the first screen's reads go out then, beside the fonts, not after them.
 */
const webQueryClient = Platform.OS === 'web' && typeof window !== 'undefined' ? newQueryClient() : null;
if (webQueryClient) prefetchFirstScreen(webQueryClient, window.location);

/**
 * The bundled fonts to load before the first render. On the web the page declares them itself
 * (preloaded, `font-display: swap`; scripts/preload-web.ts), so the first screen does not wait for
 * them: nothing to load here then.
 */
const fontsToLoad: Record<string, number> =
  Platform.OS === 'web' && typeof document !== 'undefined' && document.getElementById('isobar-fonts')
    ? {}
    : { PublicSans_400Regular, PublicSans_500Medium, PublicSans_600SemiBold, PublicSans_700Bold };

/** Providers and theme for every screen: data fetching, fonts bundled with the app, safe areas. */
export default function RootLayout() {
  const [queryClient] = useState(() => webQueryClient ?? newQueryClient());
  useFocusRing();
  const [fontsLoaded, fontError] = useFonts(fontsToLoad);
  // Render nothing for the few milliseconds the bundled fonts take, so text never jumps;
  // a font that fails to load falls back to the system font rather than blocking the app.
  if (!fontsLoaded && !fontError) return null;

  return (
    <QueryClientProvider client={queryClient}>
      <SafeAreaProvider>
        <StatusBar style="dark" />
        <SessionSync />
        <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: color.paper } }} />
      </SafeAreaProvider>
    </QueryClientProvider>
  );
}
