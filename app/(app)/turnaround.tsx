import { StyleSheet, View } from 'react-native';
import { Center, Content } from '../../components/ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../../components/ui/async-states';
import { PageHeader } from '../../components/page-header';
import { StudyList } from '../../components/study-list';
import { Text } from '../../components/ui/text';
import { formatHours } from '../../components/format';
import { color, radius, space } from '../../components/theme';
import { useAwaitingSignatureQuery } from '../../components/data/turnaround-query';

/** The chief's view: unsigned studies and how long each has waited since the procedure ended. */
export default function TurnaroundPage() {
  const waiting = useAwaitingSignatureQuery();
  const overdue = waiting.data?.items.filter((s) => s.overdue).length ?? 0;
  return (
    <Content>
      <Center style={{ gap: 24 }}>
        <PageHeader
          title="Turnaround"
          subtitle={waiting.data ? `Unsigned studies against the ${waiting.data.targetHours} h signature target.` : 'Unsigned studies against the signature target.'}
        >
          {waiting.data ? (
            <View style={[styles.summary, overdue > 0 && styles.summaryOverdue]} testID="overdue-count">
              <Text weight="semibold" tone={overdue > 0 ? 'abnormal' : 'ink'}>
                {overdue > 0 ? `▲ ${overdue} overdue` : 'None overdue'}
              </Text>
              <Text variant="caption" tone="muted">
                of {waiting.data.items.length} unsigned
              </Text>
            </View>
          ) : null}
        </PageHeader>
        {waiting.isPending ? (
          <LoadingState label="Loading unsigned studies…" />
        ) : waiting.isError ? (
          <ErrorState title="Turnaround could not be loaded" detail={waiting.error.message} onRetry={() => waiting.refetch()} />
        ) : waiting.data.items.length === 0 ? (
          <EmptyState title="Every study is signed" detail="Nothing is waiting for a signature." />
        ) : (
          <StudyList
            studies={waiting.data.items}
            testID="awaiting-signature"
            aside={(w) => {
              return (
                <View style={[styles.wait, w.overdue && styles.waitOverdue]} accessibilityLabel={`${w.overdue ? 'Overdue' : 'Within target'}, waiting ${formatHours(w.hoursWaiting)}`}>
                  <Text variant="caption" weight="semibold" tone={w.overdue ? 'abnormal' : 'muted'}>
                    {w.overdue ? '▲ Overdue' : 'Within target'} · {formatHours(w.hoursWaiting)}
                  </Text>
                </View>
              );
            }}
          />
        )}
      </Center>
    </Content>
  );
}

const styles = StyleSheet.create({
  summary: { padding: space.md, borderRadius: radius.md, backgroundColor: color.surface, borderWidth: 1, borderColor: color.line },
  summaryOverdue: { backgroundColor: color.abnormalSoft, borderColor: color.abnormal },
  wait: { paddingHorizontal: space.sm, paddingVertical: space.xxs, borderRadius: radius.pill, backgroundColor: color.surfaceSunken },
  waitOverdue: { backgroundColor: color.abnormalSoft },
});
