import { Fragment } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import type { ReportBlock, ReportCell, ReportDocument } from '../../shared/report/document';
import { Text } from '../ui/text';
import { color, radius, space } from '../theme';

/**
 * The report as the physician will sign it, laid out from the server's structured document. Every
 * piece is a string child of a text component: free text (impression, plan, indication) can never
 * become markup, whatever it contains.
 */
export function ReportDocumentView({ doc, compact = false, testID }: { doc: ReportDocument; compact?: boolean; testID?: string }) {
  return (
    <View style={styles.doc} testID={testID}>
      {doc.source ? (
        <Text variant="caption" tone="muted">
          {doc.source}
        </Text>
      ) : null}
      <Text variant={compact ? 'lead' : 'title'} weight="bold" role="heading" aria-level={3}>
        {doc.title}
      </Text>
      {doc.sections.map((section) => (
        <View key={section.key} style={styles.section} testID={testID ? `${testID}-${section.key}` : undefined}>
          {section.heading ? (
            <Text variant="caption" weight="bold" tone="brand" role="heading" aria-level={4} style={styles.heading}>
              {section.heading}
            </Text>
          ) : null}
          {section.blocks.map((block, i) => (
            <Block key={i} block={block} />
          ))}
        </View>
      ))}
      <View style={styles.footer}>
        {doc.footer.map((line) => (
          <Text key={line} variant="caption" tone="muted">
            {line}
          </Text>
        ))}
      </View>
    </View>
  );
}

function Block({ block }: { block: ReportBlock }) {
  switch (block.kind) {
    case 'paragraph':
      return (
        <Text variant="caption" weight={block.strong ? 'semibold' : 'regular'} style={styles.prose}>
          {block.text}
        </Text>
      );
    case 'subheading':
      return (
        <Text variant="caption" weight="semibold" style={styles.prose}>
          {block.text}
        </Text>
      );
    case 'list':
      return (
        <View style={styles.list}>
          {block.items.map((item, i) => (
            <View key={i} style={styles.listItem}>
              <Text variant="caption" aria-hidden style={styles.bullet}>
                •
              </Text>
              <Text variant="caption" style={styles.listText}>
                {item}
              </Text>
            </View>
          ))}
        </View>
      );
    case 'fields':
      return (
        <View style={styles.fields}>
          {block.items.map((f) => (
            <View key={f.label} style={styles.field}>
              <Text variant="caption" tone="muted" style={styles.fieldLabel}>
                {f.label}
              </Text>
              <Text variant="caption" style={styles.fieldValue}>
                {f.value}
              </Text>
            </View>
          ))}
        </View>
      );
    case 'table':
      return <Table columns={block.columns} rows={block.rows} />;
    case 'caution':
      return (
        <View style={styles.caution}>
          <Text variant="caption" tone="muted">
            {block.text}
          </Text>
        </View>
      );
  }
}

const flagTone = { abnormal: color.abnormal, borderline: color.borderline, normal: color.ink } as const;
const flagSymbol = { abnormal: '▲', borderline: '◐', normal: '' } as const;

/** A table that scrolls sideways when it is wider than the pane; flags in words beside colour. */
function Table({ columns, rows }: { columns: string[]; rows: ReportCell[][] }) {
  return (
    <ScrollView horizontal contentContainerStyle={styles.tableScroll} role="table">
      <View style={styles.table}>
        <View style={[styles.row, styles.headRow]} role="row">
          {columns.map((c, i) => (
            <View key={i} style={[styles.cell, i === 0 && styles.firstCell]} role="columnheader">
              <Text variant="caption" weight="semibold" tone="muted">
                {c}
              </Text>
            </View>
          ))}
        </View>
        {rows.map((row, r) => (
          <View key={r} style={styles.row} role="row">
            {row.map((cell, i) => (
              <View key={i} style={[styles.cell, i === 0 && styles.firstCell]} role={i === 0 ? 'rowheader' : 'cell'}>
                <Text variant="caption" weight={i === 0 || (cell.flag && cell.flag !== 'normal') ? 'semibold' : 'regular'} style={cell.flag ? { color: flagTone[cell.flag] } : undefined}>
                  {cell.flag && cell.flag !== 'normal' ? (
                    <Fragment>
                      {flagSymbol[cell.flag]} {cell.text} ({cell.flagText ?? cell.flag})
                    </Fragment>
                  ) : (
                    cell.text
                  )}
                </Text>
              </View>
            ))}
          </View>
        ))}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  doc: { gap: space.md },
  section: { gap: space.xs },
  heading: { textTransform: 'uppercase', letterSpacing: 0.6, marginTop: space.xs },
  prose: { lineHeight: 19 },
  list: { gap: space.xxs },
  listItem: { flexDirection: 'row', gap: space.xs },
  bullet: { width: 10 },
  listText: { flex: 1, lineHeight: 19 },
  fields: { gap: 1 },
  field: { flexDirection: 'row', gap: space.sm },
  fieldLabel: { width: 150, flexShrink: 0 },
  fieldValue: { flex: 1 },
  tableScroll: { flexGrow: 1 },
  table: { borderTopWidth: 1, borderTopColor: color.line, flexGrow: 1 },
  row: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: color.line },
  headRow: { backgroundColor: color.surfaceSunken },
  cell: { minWidth: 76, maxWidth: 220, paddingVertical: space.xxs + 1, paddingHorizontal: space.xs, flexGrow: 1, flexBasis: 0 },
  firstCell: { minWidth: 96 },
  caution: { borderLeftWidth: 3, borderLeftColor: color.accent, backgroundColor: color.accentSoft, borderRadius: radius.sm, padding: space.sm },
  footer: { gap: space.xxs, borderTopWidth: 1, borderTopColor: color.line, paddingTop: space.sm },
});
