import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { Link, usePathname } from 'expo-router';
import { Text } from '../ui/text';
import { useActiveInView } from '../ui/use-active-in-view';
import { color, radius, space, touchTarget } from '../theme';

const studySections = [
  { slug: '', label: 'Patient & indication', testID: 'section-overview' },
  { slug: 'setup', label: 'Setup & quality', testID: 'section-setup' },
  { slug: 'vessels', label: 'Vessels', testID: 'section-vessels' },
  { slug: 'vasoreactivity', label: 'Vasoreactivity', testID: 'section-vasoreactivity' },
  { slug: 'findings', label: 'Findings & plan', testID: 'section-findings' },
  { slug: 'coding', label: 'Coding', testID: 'section-coding' },
  { slug: 'attachments', label: 'Attachments', testID: 'section-attachments' },
  { slug: 'report', label: 'Report & signature', testID: 'section-report' },
] as const;

/**
 * The study's sections: a sticky scrolling row on phones, a column on wide screens, rows that wrap
 * above the form when the report preview takes the side. Each is its own URL.
 */
export function SectionNav({ studyId, vertical, wrap = false }: { studyId: string; vertical: boolean; wrap?: boolean }) {
  const pathname = usePathname();
  const base = `/studies/${studyId}`;
  const hrefOf = (slug: string) => (slug ? `${base}/${slug}` : base);
  const activeTab = studySections.find((s) => pathname === hrefOf(s.slug))?.testID;
  const inView = useActiveInView(vertical ? undefined : activeTab);
  const links = studySections.map((s) => {
    const href = s.slug ? `${base}/${s.slug}` : base;
    const active = pathname === href;
    return (
      <Link key={s.testID} href={href as '/'} asChild>
        <Pressable
          testID={s.testID}
          onLayout={vertical ? undefined : inView.itemLayout(s.testID)}
          role="link"
          aria-current={active ? 'page' : undefined}
          style={StyleSheet.flatten([vertical ? styles.item : styles.tab, active && (vertical ? styles.itemActive : styles.tabActive)])}
        >
          <Text variant="caption" weight={active ? 'semibold' : 'medium'} tone={active ? 'brand' : 'muted'}>
            {s.label}
          </Text>
        </Pressable>
      </Link>
    );
  });
  if (vertical) {
    return (
      <View style={styles.column} role="navigation" aria-label="Study sections">
        {links}
      </View>
    );
  }
  if (wrap) {
    return (
      <View role="navigation" aria-label="Study sections" style={[styles.bar, styles.wrap]}>
        {links}
      </View>
    );
  }
  return (
    <View role="navigation" aria-label="Study sections" style={styles.bar}>
      <ScrollView
        ref={inView.scroll}
        horizontal
        showsHorizontalScrollIndicator={false}
        contentContainerStyle={styles.row}
        scrollEventThrottle={32}
        onLayout={inView.viewportLayout}
        onScroll={(e) => inView.onScrollX(e.nativeEvent.contentOffset.x)}
      >
        {links}
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  bar: { backgroundColor: color.paper, borderBottomWidth: 1, borderBottomColor: color.line },
  row: { paddingHorizontal: space.sm, gap: space.xs },
  wrap: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.xs },
  tab: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderBottomWidth: 3, borderBottomColor: 'transparent' },
  tabActive: { borderBottomColor: color.brand },
  column: { width: 188, gap: space.xs },
  item: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderRadius: radius.md },
  itemActive: { backgroundColor: color.brandSoft },
});
