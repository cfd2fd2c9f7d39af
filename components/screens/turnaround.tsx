import { lazy, Suspense, useMemo, useState } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import { Center, Content, useIsWide } from '../ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../ui/async-states';
import { PageHeader } from '../page-header';
import { StudyList } from '../study-list';
import { Text } from '../ui/text';
import { RadioChips } from '../ui/radio-chips';
import { formatHours } from '../format';
import { color, font, radius, space, touchTarget, type } from '../theme';
import { exportHref, useAwaitingSignatureQuery, useTurnaroundFigures } from '../data/turnaround-query';
import type { UnsignedStudy } from '../../shared/turnaround/unsigned';
import { startBasisLabel } from '../../shared/turnaround/figures';
import { turnaroundQuerySchema, type TurnaroundQuery } from '../../shared/turnaround/query';
import { presetRange, rangePresetLabel, rangePresets, type RangePreset } from '../../shared/turnaround/range';

// The figures and their charts load only when this page is opened: the drawing libraries stay out
// of the bundle every other screen loads first.
const FiguresView = lazy(() => import('../turnaround/figures-view'));

type Choice = RangePreset | 'custom';

/** The chief's view: turnaround and quality figures over a range, and the unsigned studies now. */
export default function TurnaroundPage() {
  const [choice, setChoice] = useState<Choice>('3m');
  const [custom, setCustom] = useState({ from: '', to: '' });
  const parsed = useMemo(() => {
    if (choice !== 'custom') return { range: presetRange(choice, new Date()), error: null };
    const result = turnaroundQuerySchema.safeParse(custom);
    return result.success ? { range: result.data, error: null } : { range: null, error: result.error.issues[0]?.message ?? 'Check the dates.' };
  }, [choice, custom]);
  const range: TurnaroundQuery | null = parsed.range;
  const figures = useTurnaroundFigures(range);
  const wide = useIsWide();

  return (
    <Content>
      <Center style={{ gap: space.xxl }}>
        <PageHeader title="Turnaround" subtitle="How fast reports are signed, coded and delivered, the quality of the measurements, and what is waiting now." />

        <Unsigned />

        <View style={{ gap: space.md }} role="group" aria-label="Range of the figures">
          <Text variant="title" weight="semibold" role="heading" aria-level={2}>
            Figures for a range
          </Text>
          <RadioChips<Choice>
            label="Range"
            testID="range"
            options={[...rangePresets.map((p) => ({ value: p as Choice, label: rangePresetLabel[p] })), { value: 'custom', label: 'Choose dates' }]}
            value={choice}
            onChange={(c) => {
              if (c === 'custom' && range) setCustom(range);
              setChoice(c);
            }}
          />
          {choice === 'custom' ? (
            <View style={[styles.dates, wide && { flexDirection: 'row' }]}>
              <DayInput label="From" value={custom.from} onChange={(from) => setCustom((c) => ({ ...c, from }))} testID="range-from" />
              <DayInput label="To" value={custom.to} onChange={(to) => setCustom((c) => ({ ...c, to }))} testID="range-to" />
            </View>
          ) : null}
          {parsed.error ? (
            <Text variant="caption" tone="abnormal" testID="range-error" role="alert">
              {parsed.error}
            </Text>
          ) : null}
          {range ? (
            <View style={styles.rangeRow}>
              <Text variant="caption" tone="muted" testID="range-label">
                {range.from} to {range.to}, both days included
              </Text>
              <Text
                {...({ href: exportHref(range), hrefAttrs: { download: `turnaround-${range.from}-${range.to}.csv` } } as object)}
                role="link"
                accessibilityLabel={`Download the studies from ${range.from} to ${range.to} as CSV`}
                testID="export-csv"
                weight="semibold"
                tone="brand"
                style={styles.download}
              >
                Download CSV
              </Text>
            </View>
          ) : null}
        </View>

        {figures.isPending && range ? (
          <LoadingState label="Computing the figures…" testID="figures-loading" />
        ) : figures.isError ? (
          <ErrorState title="The figures could not be loaded" detail={figures.error.message} onRetry={() => figures.refetch()} />
        ) : figures.data ? (
          figures.data.studies === 0 ? (
            <EmptyState title="No studies in this range" detail="Choose a longer range or other dates." />
          ) : (
            <Suspense fallback={<LoadingState label="Loading the charts…" testID="charts-loading" />}>
              <View style={{ opacity: figures.isPlaceholderData ? 0.6 : 1 }}>
                <FiguresView figures={figures.data} />
              </View>
            </Suspense>
          )
        ) : null}
      </Center>
    </Content>
  );
}

/** Unsigned studies now, longest waiting first: age, where the clock started, and who owns the signature. */
function Unsigned() {
  const waiting = useAwaitingSignatureQuery();
  return (
    <View style={{ gap: space.md }}>
      <View style={styles.unsignedHead}>
        <Text variant="title" weight="semibold" role="heading" aria-level={2}>
          Waiting for a signature
        </Text>
        {waiting.data ? (
          <View style={[styles.summary, waiting.data.overdueTotal > 0 && styles.summaryOverdue]} testID="overdue-count">
            <Text weight="semibold" tone={waiting.data.overdueTotal > 0 ? 'abnormal' : 'ink'}>
              {waiting.data.overdueTotal > 0 ? `▲ ${waiting.data.overdueTotal} overdue` : 'None overdue'}
            </Text>
            <Text variant="caption" tone="muted">
              of {waiting.data.total} unsigned · target {waiting.data.targetHours} h
            </Text>
          </View>
        ) : null}
      </View>
      {waiting.isPending ? (
        <LoadingState label="Loading unsigned studies…" />
      ) : waiting.isError ? (
        <ErrorState title="Turnaround could not be loaded" detail={waiting.error.message} onRetry={() => waiting.refetch()} />
      ) : waiting.data.items.length === 0 ? (
        <EmptyState title="Every study is signed" detail="Nothing is waiting for a signature." />
      ) : (
        <>
          <StudyList studies={waiting.data.items} testID="awaiting-signature" aside={(w) => <WaitBadge w={w} />} />
          {waiting.data.total > waiting.data.items.length ? (
            <Text variant="caption" tone="muted">
              The {waiting.data.items.length} longest waiting of {waiting.data.total} are listed.
            </Text>
          ) : null}
        </>
      )}
    </View>
  );
}

function WaitBadge({ w }: { w: UnsignedStudy }) {
  const owner = w.ownerName ?? 'no physician recorded';
  return (
    <View style={{ gap: space.xxs }} testID={`wait-${w.accession}`}>
      <View style={[styles.wait, w.overdue && styles.waitOverdue]} accessibilityLabel={`${w.overdue ? 'Overdue' : 'Within target'}, waiting ${formatHours(w.hoursWaiting)}, owner ${owner}`}>
        <Text variant="caption" weight="semibold" tone={w.overdue ? 'abnormal' : 'muted'}>
          {w.overdue ? '▲ Overdue' : 'Within target'} · {formatHours(w.hoursWaiting)}
        </Text>
      </View>
      <Text variant="caption" tone="muted">
        Owner: {owner}
        {w.startBasis !== 'procedure-end' ? ` · from the ${startBasisLabel[w.startBasis]}` : ''}
      </Text>
    </View>
  );
}

function DayInput({ label, value, onChange, testID }: { label: string; value: string; onChange: (v: string) => void; testID: string }) {
  return (
    <View style={{ gap: space.xs, flex: 1 }}>
      <Text variant="caption" weight="medium" nativeID={`${testID}-label`}>
        {label} (YYYY-MM-DD)
      </Text>
      <TextInput value={value} onChangeText={onChange} placeholder="YYYY-MM-DD" aria-labelledby={`${testID}-label`} testID={testID} inputMode="numeric" style={styles.input} />
    </View>
  );
}

const styles = StyleSheet.create({
  unsignedHead: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'space-between', gap: space.md },
  summary: { padding: space.md, borderRadius: radius.md, backgroundColor: color.surface, borderWidth: 1, borderColor: color.line },
  summaryOverdue: { backgroundColor: color.abnormalSoft, borderColor: color.abnormal },
  wait: { paddingHorizontal: space.sm, paddingVertical: space.xxs, borderRadius: radius.pill, backgroundColor: color.surfaceSunken, alignSelf: 'flex-start' },
  waitOverdue: { backgroundColor: color.abnormalSoft },
  dates: { gap: space.md, maxWidth: 520 },
  rangeRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'space-between', gap: space.md },
  download: { minHeight: touchTarget, paddingHorizontal: space.lg, paddingVertical: space.sm, borderRadius: radius.md, borderWidth: 1, borderColor: color.brand, textAlignVertical: 'center' },
  input: { ...type.body, fontFamily: font.regular, color: color.ink, minHeight: touchTarget, borderWidth: 1, borderColor: color.line, borderRadius: radius.md, paddingHorizontal: space.md, backgroundColor: color.surface },
});
