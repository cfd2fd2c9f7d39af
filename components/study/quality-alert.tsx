import { Pressable, StyleSheet } from 'react-native';
import { Link } from 'expo-router';
import { useFormContext, useWatch } from 'react-hook-form';
import { formatQuantity, vesselShortName } from '../../shared/physiology';
import type { StudySections } from '../../shared/study/schema';
import { summariseDrift } from '../../shared/study/drift';
import { useThresholds } from '../data/thresholds-query';
import { Text } from '../ui/text';
import { color, radius, space, touchTarget } from '../theme';

/**
 * The drift check, said in the study's header whichever section is open: a measurement whose
 * pull-back Pd/Pa is missing or outside the window should not be trusted until repeated. Nothing is
 * said before a vessel exists.
 */
export function DriftAlert({ studyId }: { studyId: string }) {
  const { control } = useFormContext<StudySections>();
  const vessels = useWatch({ control, name: 'vessels' }) ?? [];
  const { values: t } = useThresholds();
  const drift = summariseDrift(vessels, t);
  if (!drift.judged || (drift.missing.length === 0 && drift.outside.length === 0)) return null;
  const names = (codes: typeof drift.missing) => codes.map((c) => vesselShortName[c]).join(', ');
  const text = [
    drift.outside.length ? `outside ${formatQuantity(t.driftLow, 'ratio')}–${formatQuantity(t.driftHigh, 'ratio')} for ${names(drift.outside)}` : '',
    drift.missing.length ? `missing for ${names(drift.missing)}` : '',
  ]
    .filter(Boolean)
    .join('; ');
  return (
    <Link href={`/studies/${studyId}/setup` as '/'} asChild>
      <Pressable role="link" testID="drift-alert" accessibilityLabel={`Drift check ${text}. Open setup and quality.`} style={StyleSheet.flatten(styles.pill)}>
        <Text variant="caption" weight="semibold" tone="abnormal">
          ▲ Drift check {text}
        </Text>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  pill: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderRadius: radius.md, backgroundColor: color.abnormalSoft, borderWidth: 1, borderColor: color.abnormal },
});
