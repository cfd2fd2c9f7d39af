import type { ReactNode } from 'react';
import { ScrollView, StyleSheet, View, useWindowDimensions, type StyleProp, type ViewStyle } from 'react-native';
import { SafeAreaView } from 'react-native-safe-area-context';
import { breakpoint, color, maxContentWidth, space } from '../theme';

/** True on screens wide enough for side navigation and two panes. */
export function useIsWide(): boolean {
  return useWindowDimensions().width >= breakpoint.wide;
}

/** The page: paper background, safe areas respected. */
export function Screen({ children, testID }: { children: ReactNode; testID?: string }) {
  return (
    <SafeAreaView style={styles.screen} testID={testID}>
      {children}
    </SafeAreaView>
  );
}

/** Scrolling content with the page's padding; phone padding by default, wider on wide screens. */
export function Content({ children, style }: { children: ReactNode; style?: StyleProp<ViewStyle> }) {
  const wide = useIsWide();
  return (
    <ScrollView contentContainerStyle={[styles.content, wide && styles.contentWide, style]} keyboardShouldPersistTaps="handled">
      {children}
    </ScrollView>
  );
}

/** A centred column that stops growing at the reading width. */
export function Center({ children, style }: { children: ReactNode; style?: StyleProp<ViewStyle> }) {
  return <View style={[styles.center, style]}>{children}</View>;
}

const styles = StyleSheet.create({
  screen: { flex: 1, backgroundColor: color.paper },
  content: { flexGrow: 1, padding: space.lg },
  contentWide: { paddingHorizontal: space.xxxl, paddingVertical: space.xxl },
  center: { width: '100%', maxWidth: maxContentWidth, alignSelf: 'center' },
});
