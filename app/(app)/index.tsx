import { useEffect, useState } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { Link, Redirect, useRouter } from 'expo-router';
import { can } from '../../shared/auth/permissions';
import { studyStateLabel, studyStates, type StudyState } from '../../shared/study/vocabulary';
import { Center, Content } from '../../components/ui/layout';
import { Button } from '../../components/ui/button';
import { Text } from '../../components/ui/text';
import { EmptyState, ErrorState, LoadingState } from '../../components/ui/async-states';
import { PageHeader } from '../../components/page-header';
import { StudyList } from '../../components/study-list';
import { CautionNote } from '../../components/caution-note';
import { useMeQuery } from '../../components/data/me-query';
import { useOperators, useWorklist, type WorklistFilters } from '../../components/data/study-query';
import { color, font, radius, space, touchTarget, type } from '../../components/theme';

/** The worklist: studies newest first, searchable, filtered by state, operator and date. */
export default function WorklistPage() {
  const me = useMeQuery();
  const router = useRouter();
  const [search, setSearch] = useState('');
  const [filters, setFilters] = useState<WorklistFilters>({});
  const operators = useOperators();
  const worklist = useWorklist(filters);

  // Search as the user types, after a short pause.
  useEffect(() => {
    const t = setTimeout(() => setFilters((f) => ({ ...f, q: search.trim() || undefined })), 300);
    return () => clearTimeout(t);
  }, [search]);

  if (me.data && !can(me.data.role, 'study:read')) return <Redirect href={(me.data.home ?? '/sign-in') as '/'} />;
  const items = worklist.data?.pages.flatMap((p) => p.items) ?? [];
  const toggle = <K extends keyof WorklistFilters>(key: K, value: WorklistFilters[K]) => setFilters((f) => ({ ...f, [key]: f[key] === value ? undefined : value }));

  return (
    <Content>
      <Center style={styles.center}>
        <PageHeader title="Worklist" subtitle="Physiology studies, newest first.">
          {can(me.data?.role, 'study:write') ? <Button testID="new-study" label="New study" onPress={() => router.push('/studies/new')} /> : null}
        </PageHeader>
        <View style={styles.filters}>
          <TextInput
            testID="worklist-search"
            accessibilityLabel="Search by MRN, name or accession"
            placeholder="Search by MRN, name or accession"
            value={search}
            onChangeText={setSearch}
            style={styles.search}
            inputMode="search"
          />
          <FilterChips label="State" testID="filter-state" options={studyStates.map((s) => ({ value: s, label: studyStateLabel[s] }))} value={filters.state} onPick={(v) => toggle('state', v as StudyState)} />
          {operators.data?.items.length ? (
            <FilterChips label="Operator" testID="filter-operator" options={operators.data.items.map((o) => ({ value: o.id, label: o.displayName }))} value={filters.operatorId} onPick={(v) => toggle('operatorId', v)} />
          ) : null}
          <FilterChips
            label="When"
            testID="filter-when"
            options={[
              { value: 'today', label: 'Today' },
              { value: 'week', label: 'Last 7 days' },
            ]}
            value={filters.from === isoDay(0) ? 'today' : filters.from === isoDay(-6) ? 'week' : undefined}
            onPick={(v) => setFilters((f) => ({ ...f, from: (v === 'today' ? isoDay(0) : isoDay(-6)) === f.from ? undefined : v === 'today' ? isoDay(0) : isoDay(-6) }))}
          />
        </View>
        {worklist.isPending ? (
          <LoadingState label="Loading studies…" />
        ) : worklist.isError ? (
          <ErrorState title="The worklist could not be loaded" detail={worklist.error.message} onRetry={() => worklist.refetch()} />
        ) : items.length === 0 ? (
          <EmptyState
            title={filters.q || filters.state || filters.operatorId || filters.from ? 'No study matches' : 'No studies yet'}
            detail={filters.q || filters.state || filters.operatorId || filters.from ? 'Change the search or clear a filter.' : 'Open one with "New study".'}
          />
        ) : (
          <>
            <StudyList
              studies={items}
              testID="worklist"
              dayOf={(s) => s.sortAt}
              aside={(s) => (
                <Link href={`/studies/${s.id}`} asChild>
                  <Pressable testID={`open-${s.accession}`} role="link" accessibilityLabel={`Open study ${s.accession}`} style={styles.open}>
                    <Text weight="semibold" tone="brand">
                      Open →
                    </Text>
                  </Pressable>
                </Link>
              )}
            />
            {worklist.hasNextPage ? (
              <Button testID="worklist-more" kind="secondary" label={worklist.isFetchingNextPage ? 'Loading…' : 'Show more'} onPress={() => void worklist.fetchNextPage()} disabled={worklist.isFetchingNextPage} />
            ) : null}
          </>
        )}
        <CautionNote />
      </Center>
    </Content>
  );
}

/** Local midnight `offset` days from today, as an instant: the lab's day, whatever the server's zone. */
function isoDay(offset: number): string {
  const d = new Date();
  d.setHours(0, 0, 0, 0);
  d.setDate(d.getDate() + offset);
  return d.toISOString();
}

function FilterChips({ label, options, value, onPick, testID }: { label: string; options: { value: string; label: string }[]; value?: string; onPick: (v: string) => void; testID: string }) {
  return (
    <View style={styles.filterRow} role="group" aria-label={label}>
      <Text variant="caption" weight="semibold" tone="muted" style={styles.filterLabel}>
        {label}
      </Text>
      {options.map((o) => {
        const on = value === o.value;
        return (
          <Pressable key={o.value} testID={`${testID}-${o.value}`} role="checkbox" aria-checked={on} accessibilityLabel={`${label}: ${o.label}`} onPress={() => onPick(o.value)} style={[styles.chip, on && styles.chipOn]}>
            <Text variant="caption" weight={on ? 'semibold' : 'regular'} tone={on ? 'onBrand' : 'ink'}>
              {on ? '✓ ' : ''}
              {o.label}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  center: { gap: space.xl },
  filters: { gap: space.sm },
  search: { minHeight: touchTarget, borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, backgroundColor: color.surface, paddingHorizontal: space.md, fontFamily: font.regular, fontSize: type.body.fontSize, color: color.ink },
  filterRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.xs },
  filterLabel: { width: 64 },
  chip: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderRadius: radius.pill, borderWidth: 1, borderColor: color.line, backgroundColor: color.surface },
  chipOn: { backgroundColor: color.brand, borderColor: color.brand },
  open: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md },
});
