import { useEffect, useState } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import { Redirect, useLocalSearchParams, useRouter } from 'expo-router';
import { can } from '../../shared/auth/permissions';
import { studyStateLabel, studyStates, type StudyState } from '../../shared/study/vocabulary';
import { Center, Content } from '../../components/ui/layout';
import { Button } from '../../components/ui/button';
import { Text } from '../../components/ui/text';
import { EmptyState, ErrorState, LoadingState } from '../../components/ui/async-states';
import { PageHeader } from '../../components/page-header';
import { RadioChips } from '../../components/ui/radio-chips';
import { StudyList } from '../../components/study-list';
import { CautionNote } from '../../components/caution-note';
import { AwaitingSignatureLists } from '../../components/awaiting-signature';
import { useMeQuery } from '../../components/data/me-query';
import { useOperators, useWorklist, type WorklistFilters } from '../../components/data/study-query';
import { color, font, radius, space, touchTarget, type } from '../../components/theme';

/** The worklist: studies newest first, searchable, filtered by state, operator and date. */
export default function WorklistPage() {
  const me = useMeQuery();
  const router = useRouter();
  // The filters live in the address, so a reload, a bookmark or the back button keeps them.
  const params = useLocalSearchParams<{ q?: string; state?: string; operator?: string; when?: string }>();
  const when = params.when === 'today' || params.when === 'week' ? params.when : undefined;
  const filters: WorklistFilters = {
    q: params.q?.trim() || undefined,
    state: studyStates.includes(params.state as StudyState) ? (params.state as StudyState) : undefined,
    operatorId: params.operator || undefined,
    from: when === 'today' ? isoDay(0) : when === 'week' ? isoDay(-6) : undefined,
  };
  const setParam = (key: 'q' | 'state' | 'operator' | 'when', value: string | undefined) => router.setParams({ [key]: value || undefined });
  const [search, setSearch] = useState(params.q ?? '');
  const operators = useOperators();
  const worklist = useWorklist(filters);

  // Search as the user types, after a short pause.
  useEffect(() => {
    const t = setTimeout(() => {
      if ((search.trim() || undefined) !== (params.q?.trim() || undefined)) setParam('q', search.trim());
    }, 300);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [search]);

  if (me.data && !can(me.data.role, 'study:read')) return <Redirect href={(me.data.home ?? '/sign-in') as '/'} />;
  const items = worklist.data?.pages.flatMap((p) => p.items) ?? [];
  // A physician lands on what awaits their signature, above the worklist.
  const signs = can(me.data?.role, 'study:sign');

  return (
    <Content>
      <Center style={styles.center}>
        <PageHeader title="Worklist" subtitle={signs ? 'Studies awaiting signature, then every physiology study, newest first.' : 'Physiology studies, newest first.'}>
          {can(me.data?.role, 'study:write') ? <Button testID="new-study" label="New study" onPress={() => router.push('/studies/new')} /> : null}
        </PageHeader>
        {signs ? <AwaitingSignatureLists /> : null}
        {signs ? (
          <Text variant="title" weight="semibold" role="heading" aria-level={2} testID="worklist-heading">
            All studies
          </Text>
        ) : null}
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
          <FilterChips label="State" testID="filter-state" options={studyStates.map((s) => ({ value: s, label: studyStateLabel[s] }))} value={filters.state} onPick={(v) => setParam('state', v)} />
          {operators.data?.items.length ? (
            <FilterChips label="Operator" testID="filter-operator" options={operators.data.items.map((o) => ({ value: o.id, label: o.displayName }))} value={filters.operatorId} onPick={(v) => setParam('operator', v)} />
          ) : null}
          <FilterChips
            label="When"
            testID="filter-when"
            options={[
              { value: 'today', label: 'Today' },
              { value: 'week', label: 'Last 7 days' },
            ]}
            value={when}
            onPick={(v) => setParam('when', v)}
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
              firstRows={8}
              dayOf={(s) => s.sortAt}
              aside={(s) => (
                <View testID={`open-${s.accession}`} style={styles.open} aria-hidden>
                  <Text weight="semibold" tone="brand">
                    Open →
                  </Text>
                </View>
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

/** One filter: "Any" or one value, as a radio group. */
function FilterChips({ label, options, value, onPick, testID }: { label: string; options: { value: string; label: string }[]; value?: string; onPick: (v: string) => void; testID: string }) {
  return (
    <View style={styles.filterRow}>
      <Text variant="caption" weight="semibold" tone="muted" style={styles.filterLabel} nativeID={`${testID}-label`}>
        {label}
      </Text>
      <RadioChips pill testID={testID} labelledBy={`${testID}-label`} style={styles.filterChips} options={[{ value: '', label: 'Any', quiet: true }, ...options]} value={value ?? ''} onChange={onPick} />
    </View>
  );
}

const styles = StyleSheet.create({
  center: { gap: space.xl },
  filters: { gap: space.sm },
  search: { minHeight: touchTarget, borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, backgroundColor: color.surface, paddingHorizontal: space.md, fontFamily: font.regular, fontSize: type.body.fontSize, color: color.ink },
  filterRow: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  filterLabel: { width: 64 },
  filterChips: { flex: 1, gap: space.xs },
  open: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md },
});
