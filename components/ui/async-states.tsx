import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { Button } from './button';
import { Text } from './text';
import { color, radius, space } from '../theme';

export function LoadingState({ label, testID = 'loading' }: { label: string; testID?: string }) {
  return (
    <View style={styles.box} testID={testID} accessibilityRole="progressbar" accessibilityLabel={label} aria-busy>
      <ActivityIndicator color={color.brand} />
      <Text tone="muted">{label}</Text>
    </View>
  );
}

export function ErrorState({ title, detail, onRetry, testID = 'error-state' }: { title: string; detail?: string; onRetry?: () => void; testID?: string }) {
  return (
    <View style={[styles.box, styles.error]} testID={testID} accessibilityRole="alert">
      <Text weight="semibold" tone="abnormal">
        {title}
      </Text>
      {detail ? <Text tone="muted">{detail}</Text> : null}
      {onRetry ? <Button kind="secondary" label="Try again" onPress={onRetry} testID={`${testID}-retry`} /> : null}
    </View>
  );
}

export function EmptyState({ title, detail, testID = 'empty-state' }: { title: string; detail?: string; testID?: string }) {
  return (
    <View style={styles.box} testID={testID}>
      <Text weight="semibold">{title}</Text>
      {detail ? <Text tone="muted">{detail}</Text> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: {
    gap: space.sm,
    padding: space.xl,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: color.line,
    backgroundColor: color.surface,
    alignItems: 'flex-start',
  },
  error: { borderColor: color.abnormal, backgroundColor: color.abnormalSoft },
});
