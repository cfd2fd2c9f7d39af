import { useState } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { Text } from '../ui/text';
import { color, radius, space } from '../theme';

export interface Column {
  title: string;
  /** Numbers line up on the right. */
  numeric?: boolean;
  width?: number;
}

export interface Cell {
  text: string;
  /** Marks a figure that needs attention (shown with ▲ and in the alert colour, never by colour alone). */
  alert?: boolean;
}

/**
 * A real table (table, row, column header and cell roles) with selectable text, and a button that
 * copies it as tab-separated text for a spreadsheet. Scrolls sideways when a phone is too narrow.
 */
export function DataTable({ caption, columns, rows, testID }: { caption: string; columns: Column[]; rows: (string | Cell)[][]; testID: string }) {
  const [copied, setCopied] = useState(false);
  const cellOf = (c: string | Cell): Cell => (typeof c === 'string' ? { text: c } : c);
  const copy = async () => {
    const tsv = [columns.map((c) => c.title), ...rows.map((r) => r.map((c) => cellOf(c).text))].map((r) => r.join('\t')).join('\n');
    try {
      await navigator.clipboard.writeText(tsv);
      setCopied(true);
      setTimeout(() => setCopied(false), 2000);
    } catch {
      setCopied(false);
    }
  };
  return (
    <View style={styles.box}>
      <View style={styles.head}>
        <Text variant="caption" weight="semibold" tone="muted" nativeID={`${testID}-caption`} style={{ flexShrink: 1 }}>
          {caption}
        </Text>
        <Pressable onPress={copy} role="button" accessibilityLabel={`Copy the table: ${caption}`} testID={`${testID}-copy`} style={styles.copy}>
          <Text variant="caption" weight="semibold" tone="brand">
            {copied ? 'Copied' : 'Copy'}
          </Text>
        </Pressable>
      </View>
      <ScrollView horizontal showsHorizontalScrollIndicator>
        <View role="table" aria-labelledby={`${testID}-caption`} testID={testID} style={styles.table}>
          <View role="row" style={[styles.row, styles.headerRow]}>
            {columns.map((c) => (
              <View key={c.title} role="columnheader" style={[styles.cell, { width: c.width ?? 96 }]}>
                <Text variant="caption" weight="semibold" style={c.numeric ? styles.numeric : undefined}>
                  {c.title}
                </Text>
              </View>
            ))}
          </View>
          {rows.map((r, i) => (
            <View key={i} role="row" style={[styles.row, i % 2 === 1 && styles.striped]}>
              {r.map((raw, j) => {
                const c = cellOf(raw);
                return (
                  <View key={j} role={j === 0 ? 'rowheader' : 'cell'} style={[styles.cell, { width: columns[j]?.width ?? 96 }]}>
                    <Text variant="caption" weight={c.alert ? 'semibold' : 'regular'} tone={c.alert ? 'abnormal' : 'ink'} style={columns[j]?.numeric ? styles.numeric : undefined} selectable>
                      {c.alert ? `▲ ${c.text}` : c.text}
                    </Text>
                  </View>
                );
              })}
            </View>
          ))}
        </View>
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.xs, minWidth: 0 },
  head: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm },
  copy: { paddingHorizontal: space.md, paddingVertical: space.xs, borderRadius: radius.pill, borderWidth: 1, borderColor: color.line, minHeight: 32, justifyContent: 'center' },
  table: { borderWidth: 1, borderColor: color.line, borderRadius: radius.md, backgroundColor: color.surface },
  row: { flexDirection: 'row' },
  headerRow: { backgroundColor: color.surfaceSunken, borderTopLeftRadius: radius.md, borderTopRightRadius: radius.md },
  striped: { backgroundColor: color.paper },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.xs },
  numeric: { textAlign: 'right', fontVariant: ['tabular-nums'] },
});
