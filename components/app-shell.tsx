import { useState, type ReactNode } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { Link, usePathname } from 'expo-router';
import { SafeAreaView } from 'react-native-safe-area-context';
import { can, roleLabel, type Permission } from '../shared/auth/permissions';
import { BrandMark } from './brand-mark';
import { Text } from './ui/text';
import { useIsWide } from './ui/layout';
import { useActiveInView } from './ui/use-active-in-view';
import { color, radius, space, touchTarget } from './theme';
import type { Me } from '../shared/auth/users';
import { useSignOut } from './data/me-query';

interface NavItem {
  href: '/' | '/coding' | '/turnaround' | '/deliveries' | '/audit' | '/admin' | '/caught-mail';
  label: string;
  needs: Permission;
  testID: string;
}

const navItems: NavItem[] = [
  { href: '/', label: 'Worklist', needs: 'study:read', testID: 'nav-worklist' },
  { href: '/coding', label: 'Coding queue', needs: 'coding:read', testID: 'nav-coding' },
  { href: '/turnaround', label: 'Turnaround', needs: 'turnaround:read', testID: 'nav-turnaround' },
  { href: '/deliveries', label: 'EHR delivery', needs: 'delivery:manage', testID: 'nav-deliveries' },
  { href: '/audit', label: 'Audit trail', needs: 'audit:read', testID: 'nav-audit' },
  { href: '/admin', label: 'Administration', needs: 'admin:manage', testID: 'nav-admin' },
  { href: '/caught-mail', label: 'Caught mail', needs: 'admin:manage', testID: 'nav-caught-mail' },
];

/** Signed-in frame: side navigation on wide screens, a top bar with a scrolling tab row on phones. */
export function AppShell({ me, children }: { me: Me; children: ReactNode }) {
  const wide = useIsWide();
  const pathname = usePathname();
  const signOut = useSignOut();
  const items = navItems.filter((item) => can(me.role, item.needs));
  const [tabs, setTabs] = useState({ width: 0, content: 0, x: 0 });
  const moreTabs = tabs.content > tabs.width + tabs.x + 4;
  const isActive = (href: string) => (href === '/' ? pathname === '/' : pathname.startsWith(href));
  const inView = useActiveInView(wide ? undefined : items.find((item) => isActive(item.href))?.testID);

  const links = items.map((item) => (
    <Link key={item.href} href={item.href} asChild>
      <Pressable
        testID={item.testID}
        onLayout={wide ? undefined : inView.itemLayout(item.testID)}
        accessibilityRole="link"
        aria-current={isActive(item.href) ? 'page' : undefined}
        // Link's asChild hands the style to the DOM element on web, which takes one object, not an array.
        style={StyleSheet.flatten([wide ? styles.sideLink : styles.tabLink, isActive(item.href) && (wide ? styles.sideLinkActive : styles.tabLinkActive)])}
      >
        <Text weight={isActive(item.href) ? 'semibold' : 'medium'} tone={isActive(item.href) ? 'brand' : 'muted'}>
          {item.label}
        </Text>
      </Pressable>
    </Link>
  ));

  const account = (
    <View style={wide ? styles.accountWide : styles.accountPhone}>
      <View style={[styles.accountText, wide && styles.accountTextWide]}>
        <Text weight="semibold" numberOfLines={1} testID="signed-in-name">
          {me.displayName}
        </Text>
        <Text variant="caption" tone="muted" testID="signed-in-role">
          {me.role ? roleLabel[me.role] : 'No role'}
        </Text>
      </View>
      <Pressable
        testID="sign-out-button"
        accessibilityRole="button"
        accessibilityLabel="Sign out"
        onPress={() => signOut.mutate()}
        disabled={signOut.isPending}
        style={({ pressed }) => [styles.signOut, pressed && styles.signOutPressed]}
      >
        <Text weight="semibold" tone="brand" variant="caption">
          {signOut.isPending ? 'Signing out…' : 'Sign out'}
        </Text>
      </Pressable>
    </View>
  );

  const brand = (
    <View style={styles.brand}>
      <BrandMark size={28} />
      <Text variant="title" weight="bold" tone="brand">
        Isobar
      </Text>
    </View>
  );

  if (wide) {
    return (
      <SafeAreaView style={styles.rootWide}>
        <View style={styles.side} role="navigation" aria-label="Main">
          {brand}
          <View style={styles.sideLinks}>{links}</View>
          {account}
        </View>
        <View style={styles.main} role="main">
          {children}
        </View>
      </SafeAreaView>
    );
  }
  // On a phone, a study has its own compact bar (back, patient, save state) and section tabs. The
  // tree keeps its shape (null in place of the bars) so the screen below is not mounted afresh.
  const inStudy = /^\/studies\/(?!new$)[^/]+/.test(pathname);
  return (
    <SafeAreaView style={styles.root}>
      {inStudy ? null : (
        <View style={styles.topBar}>
          {brand}
          {account}
        </View>
      )}
      {items.length > 1 && !inStudy ? (
        <View role="navigation" aria-label="Main" style={styles.tabsBar}>
          <ScrollView
            horizontal
            showsHorizontalScrollIndicator={false}
            contentContainerStyle={styles.tabs}
            scrollEventThrottle={32}
            ref={inView.scroll}
            onLayout={(e) => {
              inView.viewportLayout(e);
              setTabs((t) => ({ ...t, width: e.nativeEvent.layout.width }));
            }}
            onContentSizeChange={(w) => setTabs((t) => ({ ...t, content: w }))}
            onScroll={(e) => {
              inView.onScrollX(e.nativeEvent.contentOffset.x);
              setTabs((t) => ({ ...t, x: e.nativeEvent.contentOffset.x }));
            }}
          >
            {links}
          </ScrollView>
          {moreTabs ? (
            // More tabs to the right: a fade and an arrow say so (the row scrolls sideways).
            <View style={styles.moreCue} pointerEvents="none" testID="tabs-more-cue" aria-hidden>
              <Text weight="bold" tone="brand">
                ›
              </Text>
            </View>
          ) : null}
        </View>
      ) : null}
      <View style={styles.main} role="main">
        {children}
      </View>
    </SafeAreaView>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, backgroundColor: color.paper },
  rootWide: { flex: 1, flexDirection: 'row', backgroundColor: color.paper },
  main: { flex: 1 },
  brand: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  topBar: {
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    paddingHorizontal: space.lg,
    paddingVertical: space.sm,
    backgroundColor: color.surface,
    borderBottomWidth: 1,
    borderBottomColor: color.line,
    gap: space.md,
  },
  tabsBar: { backgroundColor: color.surface, borderBottomWidth: 1, borderBottomColor: color.line },
  moreCue: {
    position: 'absolute',
    right: 0,
    top: 0,
    bottom: 0,
    alignItems: 'flex-end',
    justifyContent: 'center',
    paddingRight: space.sm,
    width: 32,
    backgroundColor: color.surface,
    boxShadow: `-16px 0 12px ${color.surface}`,
  } as object,
  tabs: { paddingHorizontal: space.sm, gap: space.xs },
  tabLink: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderBottomWidth: 3, borderBottomColor: 'transparent' },
  tabLinkActive: { borderBottomColor: color.accent },
  side: {
    width: 248,
    backgroundColor: color.surface,
    borderRightWidth: 1,
    borderRightColor: color.line,
    padding: space.lg,
    gap: space.xl,
  },
  sideLinks: { flex: 1, gap: space.xs },
  sideLink: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderRadius: radius.md, borderLeftWidth: 3, borderLeftColor: 'transparent' },
  sideLinkActive: { backgroundColor: color.brandSoft, borderLeftColor: color.accent },
  accountPhone: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexShrink: 1 },
  accountWide: { gap: space.sm, borderTopWidth: 1, borderTopColor: color.line, paddingTop: space.lg },
  accountText: { flexShrink: 1, alignItems: "flex-end" },
  accountTextWide: { alignItems: "flex-start" },
  signOut: {
    minHeight: touchTarget,
    paddingHorizontal: space.md,
    justifyContent: 'center',
    alignItems: 'center',
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: color.line,
  },
  signOutPressed: { backgroundColor: color.brandSoft },
});
