import { Children, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { Text } from '../ui/text';
import { color, radius, space } from '../theme';

export function SectionCard({ title, children, aside, testID }: { title: string; children: ReactNode; aside?: ReactNode; testID?: string }) {
  return (
    <View style={styles.card} testID={testID}>
      <View style={styles.head}>
        <Text variant="title" weight="semibold" role="heading" aria-level={2}>
          {title}
        </Text>
        {aside}
      </View>
      {children}
    </View>
  );
}

/** Fields side by side when there is room, stacked on a phone. */
export function FieldRow({ children }: { children: ReactNode }) {
  return (
    <View style={styles.row}>
      {Children.map(children, (child) => (child ? <View style={styles.cell}>{child}</View> : null))}
    </View>
  );
}

const styles = StyleSheet.create({
  card: { gap: space.lg, backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, padding: space.lg },
  head: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', alignItems: 'center', gap: space.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.lg },
  cell: { flexGrow: 1, flexBasis: 160, minWidth: 0 },
});
