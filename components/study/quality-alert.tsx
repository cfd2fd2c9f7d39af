import { Pressable, StyleSheet } from 'react-native';
import { Link } from 'expo-router';
import { useFormContext, useWatch } from 'react-hook-form';
import { defaultThresholds } from '../../shared/physiology';
import type { StudySections } from '../../shared/study/schema';
import { Text } from '../ui/text';
import { color, radius, space, touchTarget } from '../theme';

/**
 * The drift check, said in the study's header whichever section is open: a measurement whose
 * pull-back Pd/Pa is missing or outside the window should not be trusted until repeated.
 */
export function DriftAlert({ studyId }: { studyId: string }) {
  const { control } = useFormContext<StudySections>();
  const vessels = useWatch({ control, name: 'vessels' }) ?? [];
  const { driftLow, driftHigh } = defaultThresholds;
  const missing = vessels.filter((v) => v.driftPdPa == null || Number.isNaN(v.driftPdPa)).map((v) => v.vessel);
  const outside = vessels.filter((v) => typeof v.driftPdPa === 'number' && (v.driftPdPa < driftLow - 1e-9 || v.driftPdPa > driftHigh + 1e-9)).map((v) => v.vessel);
  if (vessels.length === 0 || (missing.length === 0 && outside.length === 0)) return null;
  const text = [outside.length ? `outside ${driftLow.toFixed(2)}–${driftHigh.toFixed(2)} for ${outside.join(', ')}` : '', missing.length ? `missing for ${missing.join(', ')}` : '']
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
