import { useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { Text } from '../ui/text';
import { useIsWide } from '../ui/layout';
import { RadioChips } from '../ui/radio-chips';
import { formatHours } from '../format';
import { color, radius, space } from '../theme';
import { BarChart, StackedBars, TrendChart } from './charts';
import { DataTable, type Cell } from './data-table';
import { endotypeLabel } from '../../shared/physiology/labels';
import {
  driftBinLabel,
  intervalKeys,
  intervalLabel,
  share,
  startBasisLabel,
  startBases,
  type IntervalKey,
  type IntervalStats,
  type TurnaroundFigures,
} from '../../shared/turnaround/figures';

/**
 * The figures of a range: trends per week, the physicians, quality. Loaded on demand by the
 * turnaround page (its charts pull in the drawing libraries, which no other screen needs).
 */
export default function FiguresView({ figures }: { figures: TurnaroundFigures }) {
  const [interval, setInterval] = useState<IntervalKey>('toSignature');
  const wide = useIsWide();
  const hours = (v: number | null) => (v === null ? '—' : formatHours(v));
  const target = figures.targetHours;
  const late = (s: IntervalStats, key: IntervalKey): Cell => ({ text: hours(s.median), alert: key === 'toSignature' && s.median !== null && s.median > target });
  const basisNote = startBases
    .filter((b) => b !== 'procedure-end' && figures.startBasis[b] > 0)
    .map((b) => `${figures.startBasis[b]} from the ${startBasisLabel[b]}`)
    .join('; ');
  const q = figures.quality;
  const endotypeKeys = [...new Set(q.endotypes.flatMap((m) => Object.keys(m.counts)))].sort();

  return (
    <View style={{ gap: space.xxl }} testID="turnaround-figures">
      <Section title="Turnaround per week" note={`ISO weeks in ${figures.timeZone}. ${figures.studies} studies; clocks start at the procedure end${basisNote ? ` (${basisNote})` : ''}. A step not yet taken leaves its interval open: open intervals are counted, not averaged.`}>
        <RadioChips
          label="Interval"
          testID="interval"
          options={intervalKeys.map((k) => ({ value: k, label: intervalLabel[k] }))}
          value={interval}
          onChange={setInterval}
        />
        <Pair wide={wide}>
          <View style={{ gap: space.xs }}>
            <TrendChart
              points={figures.weeks.map((w) => ({ weekStart: w.weekStart, median: w.intervals[interval].median, p90: w.intervals[interval].p90 }))}
              targetHours={interval === 'toSignature' ? target : undefined}
              label={`${intervalLabel[interval]}: median and 90th percentile per week, hours. The table beside lists the values.`}
              testID="trend-chart"
            />
            <Legend items={[{ color: color.brand, label: 'Median' }, { color: color.accent, label: '90th percentile' }, ...(interval === 'toSignature' ? [{ color: color.abnormal, label: `Target ${target} h`, dashed: true }] : [])]} />
          </View>
          <DataTable
            caption={`${intervalLabel[interval]} per ISO week`}
            testID="trend-table"
            columns={[{ title: 'Week', width: 84 }, { title: 'Studies', numeric: true, width: 64 }, { title: 'Median', numeric: true, width: 88 }, { title: '90th pct', numeric: true, width: 88 }, { title: 'Open', numeric: true, width: 56 }]}
            rows={figures.weeks.map((w) => [w.week, String(w.studies), late(w.intervals[interval], interval), hours(w.intervals[interval].p90), String(w.intervals[interval].open)])}
          />
        </Pair>
        <DataTable
          caption="The whole range"
          testID="totals-table"
          columns={[{ title: 'Interval', width: 210 }, { title: 'Median', numeric: true, width: 76 }, { title: '90th pct', numeric: true, width: 76 }, { title: 'Closed', numeric: true, width: 64 }, { title: 'Open', numeric: true, width: 56 }]}
          rows={intervalKeys.map((k) => [intervalLabel[k], late(figures.totals[k], k), hours(figures.totals[k].p90), String(figures.totals[k].closed), String(figures.totals[k].open)])}
        />
      </Section>

      <Section title="Per physician" note={`The physician who signed first, or the study's operator while it is unsigned. ▲ marks a median past the ${target} h target and studies of the range still unsigned past it.`}>
        <DataTable
          caption="Turnaround per physician (median, with the 90th percentile for signature)"
          testID="physician-table"
          columns={[
            { title: 'Physician', width: 170 },
            { title: 'Studies', numeric: true, width: 64 },
            { title: 'Overdue', numeric: true, width: 72 },
            { title: 'To signature', numeric: true, width: 96 },
            { title: 'Sig. 90th pct', numeric: true, width: 96 },
            { title: 'Sig. → codes', numeric: true, width: 96 },
            { title: 'Sig. → EHR', numeric: true, width: 90 },
            { title: 'All done', numeric: true, width: 84 },
          ]}
          rows={figures.physicians.map((p) => [
            p.name,
            String(p.studies),
            { text: String(p.overdue), alert: p.overdue > 0 },
            late(p.intervals.toSignature, 'toSignature'),
            hours(p.intervals.toSignature.p90),
            hours(p.intervals.toCoded.median),
            hours(p.intervals.toDelivered.median),
            hours(p.intervals.toDone.median),
          ])}
        />
      </Section>

      <Section title="Quality" note={`From the ${q.signedStudies} signed studies of the range, as they were signed (the record, the computed warnings and the thresholds the report used).`}>
        <View style={[styles.tiles, wide && styles.tilesWide]}>
          <Tile value={share(q.driftDocumentedStudies, q.pressureStudies)} label={`drift check documented for every pressure-wire vessel (${q.driftDocumentedStudies} of ${q.pressureStudies} studies)`} testID="quality-drift" />
          <Tile value={share(q.thermoCompleteStudies, q.thermoStudies)} label={`three or more injections at rest and at hyperaemia in every thermodilution vessel (${q.thermoCompleteStudies} of ${q.thermoStudies} studies)`} testID="quality-injections" />
          <Tile value={share(q.warnedVessels, q.vessels)} label={`vessels with a quality warning (${q.warnedVessels} of ${q.vessels})`} testID="quality-warnings" />
          <Tile value={share(q.driftOutsideVessels, q.driftVessels)} label={`drift checks outside the lab's window (${q.driftOutsideVessels} of ${q.driftVessels} vessels)`} testID="quality-drift-outside" />
        </View>
        <Pair wide={wide}>
          <View style={{ gap: space.xs }}>
            <BarChart
              bars={q.driftBins.map((b, i) => ({ key: String(i), label: b.from === null ? `<${b.to!.toFixed(2)}` : b.to === null ? `≥${b.from.toFixed(2)}` : b.from.toFixed(2), value: b.vessels, highlight: b.inWindow }))}
              label="Distribution of the drift check Pd/Pa over vessels. The table beside lists the counts."
              testID="drift-chart"
            />
            <Legend items={[{ color: color.normal, label: 'Bands 0.98 to under 1.02' }, { color: color.borderline, label: 'Other bands (the tile above counts 1.02 itself as within)' }]} />
          </View>
          <DataTable
            caption="Drift check Pd/Pa: vessels per band"
            testID="drift-table"
            columns={[{ title: 'Pd/Pa', width: 100 }, { title: 'Vessels', numeric: true, width: 70 }]}
            rows={q.driftBins.map((b) => [driftBinLabel(b), String(b.vessels)])}
          />
        </Pair>
        <Pair wide={wide}>
          <View style={{ gap: space.xs }}>
            <StackedBars
              columns={q.endotypes.map((m) => ({ key: m.month, label: m.month.slice(2), parts: endotypeKeys.map((k) => ({ key: k, value: m.counts[k as keyof typeof m.counts] ?? 0 })) }))}
              palette={endotypePalette}
              label="Endotype mix of the signed studies per month. The table beside lists the counts."
              testID="endotype-chart"
            />
            <Legend items={endotypeKeys.map((k) => ({ color: endotypePalette[k] ?? color.inkFaint, label: endotypeName(k) }))} />
          </View>
          <DataTable
            caption="Endotype per month (signed studies)"
            testID="endotype-table"
            columns={[{ title: 'Month', width: 76 }, ...endotypeKeys.map((k) => ({ title: endotypeName(k), numeric: true, width: 110 }))]}
            rows={q.endotypes.map((m) => [m.month, ...endotypeKeys.map((k) => String(m.counts[k as keyof typeof m.counts] ?? 0))])}
          />
        </Pair>
      </Section>
    </View>
  );
}

const endotypeName = (k: string) => (k in endotypeLabel ? endotypeLabel[k as keyof typeof endotypeLabel] : 'Not recorded');

const endotypePalette: Record<string, string> = {
  obstructive: '#17324A',
  'microvascular-angina': '#2F7FC1',
  'vasospastic-angina': '#B8862F',
  mixed: '#7A4E9C',
  'no-abnormality': '#2D6A4F',
  inconclusive: '#9AA5B1',
  unknown: '#D8D3C7',
};

function Section({ title, note, children }: { title: string; note?: string; children: ReactNode }) {
  return (
    <View style={{ gap: space.md }}>
      <View style={{ gap: space.xxs }}>
        <Text variant="title" weight="semibold" role="heading" aria-level={2}>
          {title}
        </Text>
        {note ? (
          <Text variant="caption" tone="muted">
            {note}
          </Text>
        ) : null}
      </View>
      {children}
    </View>
  );
}

/** A chart and its table: side by side on a wide screen, the table below the chart on a phone. */
function Pair({ wide, children }: { wide: boolean; children: [ReactNode, ReactNode] }) {
  return (
    <View style={[styles.pair, wide && styles.pairWide]}>
      <View style={[styles.card, wide && { flex: 3 }]}>{children[0]}</View>
      <View style={wide ? { flex: 2, minWidth: 0 } : undefined}>{children[1]}</View>
    </View>
  );
}

function Legend({ items }: { items: { color: string; label: string; dashed?: boolean }[] }) {
  return (
    <View style={styles.legend} aria-hidden>
      {items.map((i) => (
        <View key={i.label} style={styles.legendItem}>
          <View style={[styles.swatch, { backgroundColor: i.dashed ? 'transparent' : i.color, borderColor: i.color, borderStyle: i.dashed ? 'dashed' : 'solid' }]} />
          <Text variant="caption" tone="muted">
            {i.label}
          </Text>
        </View>
      ))}
    </View>
  );
}

function Tile({ value, label, testID }: { value: string; label: string; testID: string }) {
  return (
    <View style={styles.tile} testID={testID}>
      <Text variant="title" weight="bold">
        {value}
      </Text>
      <Text variant="caption" tone="muted">
        {label}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  pair: { gap: space.md },
  pairWide: { flexDirection: 'row', alignItems: 'flex-start', gap: space.xl },
  card: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, padding: space.sm, gap: space.xs },
  legend: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, paddingHorizontal: space.xs },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  swatch: { width: 14, height: 4, borderWidth: 2, borderRadius: 2 },
  tiles: { gap: space.sm },
  tilesWide: { flexDirection: 'row' },
  tile: { flex: 1, backgroundColor: color.surface, borderRadius: radius.md, borderWidth: 1, borderColor: color.line, padding: space.md, gap: space.xxs },
});
