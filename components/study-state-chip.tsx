import { StyleSheet, View } from 'react-native';
import { Text } from './ui/text';
import { studyStateLabel, type StudyState } from '../shared/study/vocabulary';
import { color, radius, space } from './theme';

/** A study's state in words with a symbol, so it reads without colour. */
const look: Record<StudyState, { label: string; symbol: string; fg: string; bg: string }> = {
  draft: { label: studyStateLabel.draft, symbol: '○', fg: color.inkMuted, bg: color.surfaceSunken },
  'awaiting-signature': { label: studyStateLabel['awaiting-signature'], symbol: '◐', fg: color.borderline, bg: color.borderlineSoft },
  signed: { label: studyStateLabel.signed, symbol: '●', fg: color.normal, bg: color.normalSoft },
  amending: { label: studyStateLabel.amending, symbol: '◇', fg: color.brand, bg: color.brandSoft },
  amended: { label: studyStateLabel.amended, symbol: '◆', fg: color.brand, bg: color.brandSoft },
};

export function StudyStateChip({ state }: { state: StudyState }) {
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
