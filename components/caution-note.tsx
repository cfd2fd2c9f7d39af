import { StyleSheet, View } from 'react-native';
import { Text } from './ui/text';
import { color, radius, space } from './theme';

/** The standing caution: computed values and code suggestions support, never replace, a professional's decision. */
export function CautionNote({ testID = 'caution-note' }: { testID?: string }) {
  return (
    <View style={styles.box} testID={testID} accessibilityRole="summary">
      <Text variant="caption" tone="muted">
        <Text variant="caption" weight="semibold" tone="muted">
          Decision support only.{' '}
        </Text>
        Computed indices and endotypes are for review by a licensed clinician; code suggestions are for a certified coder.
        Local policy, the lab's thresholds and the current code sets apply.
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: {
    borderLeftWidth: 3,
    borderLeftColor: color.accent,
    backgroundColor: color.accentSoft,
    borderRadius: radius.sm,
    paddingHorizontal: space.md,
    paddingVertical: space.sm,
  },
});
