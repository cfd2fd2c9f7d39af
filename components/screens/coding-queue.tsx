import { useState } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { Link } from 'expo-router';
import { Center, Content, useIsWide } from '../ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../ui/async-states';
import { PageHeader } from '../page-header';
import { CautionNote } from '../caution-note';
import { Text } from '../ui/text';
import { Button } from '../ui/button';
import { patientName } from '../format';
import { useCodingQueue, type QueueFilters } from '../data/coding-query';
import { useOperators } from '../data/study-query';
import { reviewStatusLabel, type QueueItem } from '../../shared/coding/review';
import { isoDay as localIsoDay } from '../../shared/turnaround/range';
import { color, font, radius, space, touchTarget, type } from '../theme';

const isoDay = /^\d{4}-\d{2}-\d{2}$/;

/** How long a study has waited, in words a queue can be scanned by. */
function ageLabel(hours: number): string {
  if (hours < 1) return 'under an hour';
  if (hours < 48) return `${hours} h`;
  return `${Math.floor(hours / 24)} days`;
}

/** The coder's queue: signed studies whose codes await review, oldest first, with filters. */
export default function CodingQueuePage() {
  const [filters, setFilters] = useState<QueueFilters>({});
  const queue = useCodingQueue(filters);
  const operators = useOperators();
  const set = (patch: QueueFilters) => setFilters((f) => ({ ...f, ...patch }));
  return (
    <Content>
      <Center style={{ gap: space.xl }}>
        <PageHeader title="Coding queue" subtitle="Signed studies whose codes await review, oldest first." />
        <View style={styles.filters} role="group" aria-label="Filter the queue">
          <Chips
            label="Status"
            testID="queue-status"
            value={filters.status ?? 'open'}
            options={[
              { value: 'open', label: 'To code or in review' },
              { value: 'coded', label: 'Coded' },
            ]}
            onChange={(v) => set({ status: v === 'open' ? undefined : (v as QueueFilters['status']) })}
          />
          <Chips
            label="Physician"
            testID="queue-operator"
            value={filters.operatorId ?? ''}
            options={[{ value: '', label: 'Anyone' }, ...(operators.data?.items ?? []).map((o) => ({ value: o.id, label: o.displayName }))]}
            onChange={(v) => set({ operatorId: v || undefined })}
          />
          <View style={styles.dates}>
            <DayInput label="Signed from" testID="queue-from" onDay={(d) => set({ from: d })} />
            <DayInput label="Signed to" testID="queue-to" onDay={(d) => set({ to: d })} />
          </View>
        </View>
        {queue.isPending ? (
          <LoadingState label="Loading the queue…" />
        ) : queue.isError ? (
          <ErrorState title="The coding queue could not be loaded" detail={queue.error.message} onRetry={() => queue.refetch()} />
        ) : queue.data.items.length === 0 ? (
          <EmptyState title="Nothing to code" detail="Studies appear here when their report is signed, and again when an addendum changes what the codes depend on." />
        ) : (
          <QueueList items={queue.data.items} />
        )}
        <ExportCodes />
        <CautionNote />
      </Center>
    </Content>
  );
}

function QueueList({ items }: { items: QueueItem[] }) {
  const wide = useIsWide();
  return (
    <View style={styles.list} role="list" testID="coding-queue">
      {items.map((s, i) => (
        <View key={s.studyId} role="listitem">
          <Link href={`/coding/${s.studyId}` as '/'} asChild>
            <Pressable
              role="link"
              testID={`queue-row-${s.accession}`}
              accessibilityLabel={`${patientName(s.patient)}, ${s.accession}, ${reviewStatusLabel[s.status]}, waiting ${ageLabel(s.hoursWaiting)}. Open the code review.`}
              style={StyleSheet.flatten([styles.row, wide && styles.rowWide, i > 0 && styles.divider])}
            >
              <View style={[styles.cell, wide && { flex: 1.3 }]}>
                <Text weight="semibold">{patientName(s.patient)}</Text>
                <Text variant="caption" tone="muted">
                  MRN {s.patient.mrn} · {s.accession}
                </Text>
              </View>
              <View style={[styles.cell, wide && { flex: 1 }]}>
                <Text variant="caption" weight="medium">
                  {reviewStatusLabel[s.status]}
                  {s.versionNo > 1 ? ` · addendum (version ${s.versionNo})` : ''}
                </Text>
                <Text variant="caption" tone="muted">
                  {s.operatorName ?? 'No physician recorded'}
                </Text>
              </View>
              <View style={[styles.cell, wide && { flex: 1 }]}>
                <Text variant="caption" weight="medium" testID={`queue-age-${s.accession}`}>
                  Waiting {ageLabel(s.hoursWaiting)}
                </Text>
                <Text variant="caption" tone={s.blockingWarnings ? 'abnormal' : 'muted'}>
                  {s.codeCount} suggested code{s.codeCount === 1 ? '' : 's'}
                  {s.blockingWarnings ? ` · ▲ ${s.blockingWarnings} to resolve in the study` : ''}
                </Text>
              </View>
              <Text tone="brand" weight="semibold" aria-hidden>
                Review ›
              </Text>
            </Pressable>
          </Link>
        </View>
      ))}
    </View>
  );
}

/** The reviewed codes of the days chosen here (the day the review was completed; today when none), as CSV or JSON. */
function ExportCodes() {
  const [from, setFrom] = useState<string | undefined>();
  const [to, setTo] = useState<string | undefined>();
  // The browser's calendar day (the lab's, at the lab), not UTC's.
  const today = localIsoDay(new Date());
  const range = { from: from ?? to ?? today, to: to ?? from ?? today };
  const backwards = range.from > range.to;
  const open = (format: 'csv' | 'json') => {
    const url = `/api/coding/export?${new URLSearchParams({ ...range, format }).toString()}`;
    if (typeof window !== 'undefined') window.location.assign(url);
  };
  return (
    <View style={styles.exportBox} role="group" aria-label="Export reviewed codes">
      <Text weight="semibold" role="heading" aria-level={2}>
        Export reviewed codes
      </Text>
      <View style={styles.dates}>
        <DayInput label="Coded from" testID="export-from" onDay={setFrom} />
        <DayInput label="Coded to" testID="export-to" onDay={setTo} />
      </View>
      <Text variant="caption" tone={backwards ? 'abnormal' : 'muted'} testID="export-range" role={backwards ? 'alert' : undefined}>
        {backwards
          ? `▲ The last day (${range.to}) is before the first (${range.from}).`
          : `The codes as reported of the studies whose review was completed ${range.from === range.to ? `on ${range.from}` : `from ${range.from} to ${range.to}`}.`}
      </Text>
      <View style={styles.dates}>
        <Button label="Download CSV" kind="secondary" testID="export-csv" disabled={backwards} onPress={() => open('csv')} />
        <Button label="Download JSON" kind="secondary" testID="export-json" disabled={backwards} onPress={() => open('json')} />
      </View>
    </View>
  );
}

function Chips({ label, value, options, onChange, testID }: { label: string; value: string; options: { value: string; label: string }[]; onChange: (v: string) => void; testID: string }) {
  return (
    <View style={styles.group}>
      <Text variant="caption" weight="medium" nativeID={`${testID}-label`}>
        {label}
      </Text>
      <View style={styles.chips} role="radiogroup" aria-labelledby={`${testID}-label`}>
        {options.map((o) => {
          const selected = o.value === value;
          return (
            <Pressable
              key={o.value || 'any'}
              role="radio"
              aria-checked={selected}
              accessibilityLabel={o.label}
              testID={`${testID}-${o.value || 'any'}`}
              onPress={() => onChange(o.value)}
              style={[styles.chip, selected && styles.chipSelected]}
            >
              <Text variant="caption" weight={selected ? 'semibold' : 'regular'} tone={selected ? 'onBrand' : 'ink'}>
                {o.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}

/** A day typed as YYYY-MM-DD: applied once complete, cleared when emptied. */
function DayInput({ label, testID, onDay }: { label: string; testID: string; onDay: (day: string | undefined) => void }) {
  const [text, setText] = useState('');
  const bad = text !== '' && !isoDay.test(text);
  return (
    <View style={styles.group}>
      <Text variant="caption" weight="medium">
        {label}
      </Text>
      <TextInput
        testID={testID}
        accessibilityLabel={`${label} (year-month-day)`}
        placeholder="YYYY-MM-DD"
        value={text}
        inputMode="numeric"
        aria-invalid={bad}
        onChangeText={(t) => {
          setText(t);
          if (t === '') onDay(undefined);
          else if (isoDay.test(t)) onDay(t);
        }}
        style={[styles.input, bad && styles.inputBad]}
      />
      {bad ? (
        <Text variant="caption" tone="abnormal" role="alert">
          ▲ Type the day as year-month-day, e.g. 2025-03-11.
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  filters: { gap: space.md },
  group: { gap: space.xs },
  dates: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  chip: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderRadius: radius.md, borderWidth: 1, borderColor: color.line, backgroundColor: color.surface },
  chipSelected: { backgroundColor: color.brand, borderColor: color.brand },
  input: { minHeight: touchTarget, minWidth: 160, borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, backgroundColor: color.surface, paddingHorizontal: space.md, fontFamily: font.regular, fontSize: type.body.fontSize, color: color.ink },
  inputBad: { borderColor: color.abnormal, borderWidth: 2 },
  list: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, overflow: 'hidden' },
  row: { padding: space.lg, gap: space.sm, minHeight: touchTarget },
  rowWide: { flexDirection: 'row', alignItems: 'center', gap: space.xl },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  cell: { gap: space.xxs },
  exportBox: { gap: space.sm, backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, padding: space.lg },
});
