import { startTransition, useEffect, useState, type ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Link } from 'expo-router';
import { Text } from './ui/text';
import { useIsWide } from './ui/layout';
import { StudyStateChip } from './study-state-chip';
import { dayLabel, formatDateTime, patientName } from './format';
import { color, radius, space } from './theme';
import type { StudySummary } from './data/study-query';

/**
 * Studies as rows: patient first (what the team looks for), then accession, state and time.
 * With `dayOf`, rows are headed by their day, so "today first" can be seen at a glance. Each row
 * opens its study.
 */
export function StudyList<T extends StudySummary>({
  studies,
  aside,
  testID,
  dayOf,
  hrefOf = (s) => `/studies/${s.id}`,
  firstRows,
}: {
  studies: T[];
  aside?: (s: T) => ReactNode;
  testID: string;
  dayOf?: (s: T) => string | null;
  /** Where a row leads: the study's first section unless said otherwise. */
  hrefOf?: (s: T) => string;
  /**
   * Rows to put on screen in the first pass (about a phone screen's worth and more); the rest follow
   * at once in a second, interruptible pass, so the first rows do not wait for the whole page of them.
   */
  firstRows?: number;
}) {
  const wide = useIsWide();
  const now = new Date();
  const [allShown, setAllShown] = useState(firstRows === undefined);
  useEffect(() => {
    if (!allShown) startTransition(() => setAllShown(true));
  }, [allShown]);
  const shown = allShown || firstRows === undefined ? studies : studies.slice(0, firstRows);
  return (
    <View style={styles.list} testID={testID} role="list">
      {shown.map((s, i) => (
        <View key={s.id} role="listitem">
          {dayOf && (i === 0 || dayLabel(dayOf(studies[i - 1]), now) !== dayLabel(dayOf(s), now)) ? (
            <View style={[styles.day, i > 0 && styles.divider]} testID={`${testID}-day-${dayLabel(dayOf(s), now)}`}>
              <Text variant="caption" weight="semibold" tone="muted" role="heading" aria-level={2}>
                {dayLabel(dayOf(s), now)}
              </Text>
            </View>
          ) : null}
        <Link href={hrefOf(s) as '/'} asChild>
        <Pressable
          testID={`study-row-${s.accession}`}
          role="link"
          accessibilityLabel={`Open the study of ${patientName(s.patient)}, MRN ${s.patient.mrn}, ${s.accession}`}
          // Link's asChild hands the style to the DOM element on web, which takes one object, not an array.
          style={StyleSheet.flatten([styles.row, wide && styles.rowWide, (i > 0 || dayOf) && styles.divider])}
        >
          <View style={[styles.who, wide && styles.whoWide]}>
            <Text weight="semibold">{patientName(s.patient)}</Text>
            <Text variant="caption" tone="muted">
              MRN {s.patient.mrn} · born {s.patient.birthDate}
            </Text>
          </View>
          <View style={[styles.what, wide && styles.whatWide]}>
            <Text variant="caption" weight="medium">
              {s.accession}
            </Text>
            <Text variant="caption" tone="muted" numberOfLines={wide ? 1 : 2}>
              {s.indication ?? 'No indication recorded'}
            </Text>
          </View>
          <View style={[styles.when, wide && styles.whenWide]}>
            <StudyStateChip state={s.state} />
            <Text variant="caption" tone="muted">
              Ended {formatDateTime(s.procedureEndedAt)}
              {s.operatorName ? ` · ${s.operatorName}` : ''}
            </Text>
          </View>
          {aside ? <View style={styles.aside}>{aside(s)}</View> : null}
        </Pressable>
        </Link>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, overflow: 'hidden' },
  row: { padding: space.lg, gap: space.sm },
  rowWide: { flexDirection: 'row', alignItems: 'center', gap: space.xl },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  day: { paddingHorizontal: space.lg, paddingVertical: space.sm, backgroundColor: color.surfaceSunken },
  who: { gap: space.xxs },
  whoWide: { flex: 1.2 },
  what: { gap: space.xxs },
  whatWide: { flex: 1.6 },
  when: { gap: space.xs },
  whenWide: { flex: 1.2 },
  aside: { alignItems: 'flex-start' },
});
