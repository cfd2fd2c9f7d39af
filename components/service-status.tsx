import { StyleSheet, View } from 'react-native';
import { Text } from './ui/text';
import { color, radius, space } from './theme';
import { useHealthQuery } from './data/health-query';

/** A quiet line saying whether the server and its database answer. Text carries the state, not colour alone. */
export function ServiceStatus() {
  const health = useHealthQuery();
  const state = health.isPending ? 'checking' : health.isSuccess ? 'up' : 'down';
  const label = {
    checking: 'Checking the service…',
    up: 'Service ready: server and database answering',
    down: 'Service unavailable: the server or its database is not answering',
  }[state];
  return (
    <View style={styles.row} testID="service-status" accessibilityLiveRegion="polite" aria-live="polite">
      <View style={[styles.dot, state === 'up' ? styles.up : state === 'down' ? styles.down : styles.checking]} />
      <Text variant="caption" tone="muted" testID={`service-status-${state}`}>
        {label}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm, marginTop: space.xs },
  dot: { width: 8, height: 8, borderRadius: radius.pill },
  up: { backgroundColor: color.normal },
  down: { backgroundColor: color.abnormal },
  checking: { backgroundColor: color.inkFaint },
});
