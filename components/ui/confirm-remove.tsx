import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Text } from './text';
import { color, radius, space, touchTarget } from '../theme';

/**
 * A remove action that asks once before it acts: a stray tap with a gloved hand must not delete
 * measurements or a file. The question names what goes.
 */
export function ConfirmRemove({ what, onConfirm, testID }: { what: string; onConfirm: () => void; testID: string }) {
  const [asking, setAsking] = useState(false);
  if (!asking) {
    return (
      <Pressable testID={testID} role="button" accessibilityLabel={`Remove ${what}`} onPress={() => setAsking(true)} style={styles.action}>
        <Text variant="caption" weight="semibold" tone="abnormal">
          Remove
        </Text>
      </Pressable>
    );
  }
  return (
    <View style={styles.ask} role="alert">
      <Text variant="caption" weight="semibold" style={styles.question}>
        Remove {what}?
      </Text>
      <Pressable
        testID={`${testID}-confirm`}
        role="button"
        accessibilityLabel={`Yes, remove ${what}`}
        onPress={() => {
          setAsking(false);
          onConfirm();
        }}
        style={[styles.action, styles.danger]}
      >
        <Text variant="caption" weight="semibold" tone="onBrand">
          Yes, remove
        </Text>
      </Pressable>
      <Pressable testID={`${testID}-keep`} role="button" accessibilityLabel={`Keep ${what}`} onPress={() => setAsking(false)} style={styles.action}>
        <Text variant="caption" weight="semibold" tone="brand">
          Keep
        </Text>
      </Pressable>
    </View>
  );
}

const styles = StyleSheet.create({
  action: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderRadius: radius.md },
  danger: { backgroundColor: color.abnormal },
  // Its own full-width line, wrapping inside it: both answers stay on a 390 px screen.
  ask: { flexBasis: '100%', maxWidth: '100%', flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.xs, backgroundColor: color.abnormalSoft, borderRadius: radius.md, padding: space.xs, paddingLeft: space.sm },
  question: { flexBasis: '100%', flexShrink: 1 },
});
