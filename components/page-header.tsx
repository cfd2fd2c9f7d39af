import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { Text } from './ui/text';
import { space } from './theme';

export function PageHeader({ title, subtitle, children }: { title: string; subtitle?: string; children?: ReactNode }) {
  return (
    <View style={styles.header}>
      <View style={styles.text}>
        <Text variant="headline" weight="bold" role="heading" aria-level={1}>
          {title}
        </Text>
        {subtitle ? <Text tone="muted">{subtitle}</Text> : null}
      </View>
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  header: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', justifyContent: 'space-between', gap: space.md },
  text: { gap: space.xs, flexShrink: 1 },
});
