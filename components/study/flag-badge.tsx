import { StyleSheet, View } from 'react-native';
import { flagLabel, type Flag } from '../../shared/physiology';
import { Text } from '../ui/text';
import { color, radius, space } from '../theme';

const look: Record<Flag, { symbol: string; label: string; fg: string; bg: string }> = {
  normal: { symbol: '✓', label: flagLabel.normal, fg: color.normal, bg: color.normalSoft },
  borderline: { symbol: '◐', label: flagLabel.borderline, fg: color.borderline, bg: color.borderlineSoft },
  abnormal: { symbol: '▲', label: flagLabel.abnormal, fg: color.abnormal, bg: color.abnormalSoft },
};

/** A flag in words with a symbol, so it reads without colour and aloud. */
export function FlagBadge({ flag, testID }: { flag: Flag; testID?: string }) {
  const l = look[flag];
  return (
    <View style={[styles.badge, { backgroundColor: l.bg }]} testID={testID}>
      <Text variant="caption" weight="semibold" style={{ color: l.fg }}>
        {l.symbol} {l.label}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: { borderRadius: radius.pill, paddingHorizontal: space.sm, paddingVertical: 1, alignSelf: 'flex-start' },
});
