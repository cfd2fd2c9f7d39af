import { Stack } from 'expo-router';

/** The smallest Expo Router app that shows a list: one stack, one screen. */
export default function RootLayout() {
  return <Stack screenOptions={{ headerShown: false }} />;
}
