import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ageLabel, type AwaitingList, type AwaitingStudy } from '../shared/study/awaiting-signature';
import { useAwaitingSignature } from './data/awaiting-query';
import { StudyList } from './study-list';
import { Button } from './ui/button';
import { EmptyState, ErrorState, LoadingState } from './ui/async-states';
import { Text } from './ui/text';
import { color, radius, space } from './theme';

/** Rows shown before "Show all". */
const firstRows = 5;

/**
 * The physician's signing lists: studies they operated that await signature, then all studies that
 * do, each oldest first with how long it has waited. A row opens the study's report.
 */
export function AwaitingSignatureLists() {
  const awaiting = useAwaitingSignature();
  if (awaiting.isPending) return <LoadingState label="Loading studies awaiting signature…" testID="awaiting-loading" />;
  if (awaiting.isError) return <ErrorState title="Studies awaiting signature could not be loaded" detail={awaiting.error.message} onRetry={() => void awaiting.refetch()} testID="awaiting-error" />;
  const { mine, all, targetHours } = awaiting.data;
  return (
    <View style={styles.lists}>
      <AwaitingSection
        title="Awaiting your signature"
        subtitle="Studies you operated, oldest first."
        list={mine}
        targetHours={targetHours}
        empty="Nothing you operated awaits your signature."
        testID="awaiting-mine"
      />
      <AwaitingSection
        title="All awaiting signature"
        subtitle="Any physician may sign; the operator signs by default."
        list={all}
        targetHours={targetHours}
        empty="No study awaits signature."
        testID="awaiting-all"
      />
    </View>
  );
}

function AwaitingSection({ title, subtitle, list, targetHours, empty, testID }: { title: string; subtitle: string; list: AwaitingList; targetHours: number; empty: string; testID: string }) {
  const [expanded, setExpanded] = useState(false);
  const shown = expanded ? list.items : list.items.slice(0, firstRows);
  return (
    <View style={styles.section} testID={`${testID}-section`}>
      <View style={styles.head}>
        <Text variant="title" weight="semibold" role="heading" aria-level={2}>
          {title}{' '}
          <Text variant="title" weight="regular" tone="muted" testID={`${testID}-count`}>
            ({list.total})
          </Text>
        </Text>
        <Text variant="caption" tone="muted">
          {subtitle}
        </Text>
      </View>
      {list.items.length === 0 ? (
        <EmptyState title={empty} testID={`${testID}-empty`} />
      ) : (
        <>
          <StudyList<AwaitingStudy> studies={shown} testID={testID} hrefOf={(s) => `/studies/${s.id}/report`} aside={(s) => <Age study={s} targetHours={targetHours} testID={`${testID}-age-${s.accession}`} />} />
          {list.items.length > firstRows ? (
            <Button
              kind="secondary"
              testID={`${testID}-more`}
              label={expanded ? 'Show the oldest only' : `Show all ${list.items.length}${list.total > list.items.length ? ` of ${list.total}` : ''}`}
              onPress={() => setExpanded((e) => !e)}
            />
          ) : null}
        </>
      )}
    </View>
  );
}

/** How long the study has waited; past the lab's target it says so in words, not colour alone. */
function Age({ study, targetHours, testID }: { study: AwaitingStudy; targetHours: number; testID: string }) {
  return (
    <View style={[styles.age, study.overdue && styles.ageOverdue]} testID={testID} accessibilityLabel={`Waiting ${ageLabel(study.hoursWaiting)}${study.overdue ? `, past the ${targetHours} hour target` : ''}`}>
      <Text variant="caption" weight="semibold" tone={study.overdue ? 'abnormal' : 'ink'}>
        {study.overdue ? '▲ ' : ''}
        {ageLabel(study.hoursWaiting)}
      </Text>
      <Text variant="caption" tone={study.overdue ? 'abnormal' : 'muted'}>
        {study.overdue ? `past ${targetHours} h` : 'waiting'}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  lists: { gap: space.xl },
  section: { gap: space.sm },
  head: { gap: space.xxs },
  age: { minWidth: 84, alignItems: 'flex-end', paddingHorizontal: space.sm, paddingVertical: space.xs, borderRadius: radius.md, backgroundColor: color.surfaceSunken },
  ageOverdue: { backgroundColor: color.abnormalSoft },
});
