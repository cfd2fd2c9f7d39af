import { StyleSheet, View } from 'react-native';
import { Text } from './ui/text';
import { color, radius, space } from './theme';

/** A study's state in words with a symbol, so it reads without colour. */
const look = {
  draft: { label: 'Draft', symbol: '○', fg: color.inkMuted, bg: color.surfaceSunken },
  'awaiting-signature': { label: 'Awaiting signature', symbol: '◐', fg: color.borderline, bg: color.borderlineSoft },
  signed: { label: 'Signed', symbol: '●', fg: color.normal, bg: color.normalSoft },
  amended: { label: 'Amended', symbol: '◆', fg: color.brand, bg: color.brandSoft },
} as const;

export function StudyStateChip({ state }: { state: keyof typeof look }) {
  const l = look[state] ?? look.draft;
  return (
    <View style={[styles.chip, { backgroundColor: l.bg }]} accessibilityLabel={`State: ${l.label}`}>
      <Text variant="caption" weight="semibold" style={{ color: l.fg }} aria-hidden>
        {l.symbol}
      </Text>
      <Text variant="caption" weight="semibold" style={{ color: l.fg }}>
        {l.label}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  chip: { flexDirection: 'row', alignItems: 'center', gap: space.xs, paddingHorizontal: space.sm, paddingVertical: space.xxs, borderRadius: radius.pill, alignSelf: 'flex-start' },
});
