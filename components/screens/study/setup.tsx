import { StyleSheet, View } from 'react-native';
import { useFormContext, useWatch } from 'react-hook-form';
import { ChoiceField, NumberField, YesNoField } from '../../form/fields';
import { optionsOf } from '../../form/options';
import { FieldRow, SectionCard } from '../../study/section-card';
import { Text } from '../../ui/text';
import { color, radius, space } from '../../theme';
import { useThresholds } from '../../data/thresholds-query';
import { formatQuantity, vesselShortName } from '../../../shared/physiology';
import type { StudySections } from '../../../shared/study/schema';
import { summariseDrift } from '../../../shared/study/drift';
import { doseUnitLabel, drugRouteLabel, hyperemicAgentLabel, nitrateTimingLabel, rhythmLabel, wirePositionLabel } from '../../../shared/study/vocabulary';

/** Setup & quality: the steps that make the numbers trustworthy, and the drift check of every vessel. */
export default function SetupSection() {
  return (
    <>
      <DriftCheck />
      <SectionCard title="Before measuring" testID="card-setup">
        <YesNoField name="setup.transducerZeroed" label="Transducer zeroed at heart level" testID="setup-zeroed" />
        <FieldRow>
          <YesNoField name="setup.nitratesGiven" label="Intracoronary nitroglycerin given" testID="setup-nitrates" />
          <NumberField name="setup.nitrateDoseMicrograms" label="Nitroglycerin dose" unit="µg" testID="setup-nitrate-dose" />
        </FieldRow>
        <ChoiceField
          name="setup.nitrateTiming"
          label="When it was given"
          hint="In a coronary function test, nitroglycerin before acetylcholine can make the test falsely negative."
          testID="setup-nitrate-timing"
          options={optionsOf(nitrateTimingLabel)}
        />
        <FieldRow>
          <YesNoField name="setup.equalizedInAorta" label="Pressures equalized in the aorta" testID="setup-equalized" />
          <YesNoField name="setup.introducerRemoved" label="Introducer removed before equalizing" testID="setup-introducer" />
        </FieldRow>
        <ChoiceField name="setup.wirePosition" label="Wire sensor position" testID="setup-wire" options={optionsOf(wirePositionLabel)} />
        <NumberField name="setup.heparinUnits" label="Heparin" unit="U" integer testID="setup-heparin" />
      </SectionCard>
      <SectionCard title="Haemodynamics at baseline" testID="card-baseline">
        <FieldRow>
          <NumberField name="setup.baselineHeartRate" label="Heart rate" unit="bpm" integer testID="setup-baseline-hr" />
          <NumberField name="setup.baselineSystolic" label="Systolic pressure" unit="mmHg" integer testID="setup-baseline-systolic" />
          <NumberField name="setup.baselineDiastolic" label="Diastolic pressure" unit="mmHg" integer testID="setup-baseline-diastolic" />
        </FieldRow>
        <FieldRow>
          <ChoiceField name="setup.baselineRhythm" label="Rhythm" testID="setup-baseline-rhythm" options={optionsOf(rhythmLabel)} />
          <NumberField name="setup.lvedp" label="LVEDP" unit="mmHg" testID="setup-lvedp" />
        </FieldRow>
      </SectionCard>
      <SectionCard title="Hyperaemia" testID="card-hyperemia">
        <ChoiceField name="setup.hyperemicAgent" label="Agent" testID="setup-agent" options={optionsOf(hyperemicAgentLabel)} />
        <ChoiceField name="setup.hyperemicRoute" label="Route" testID="setup-route" options={optionsOf(drugRouteLabel)} />
        <FieldRow>
          <NumberField name="setup.hyperemicDose" label="Dose" testID="setup-dose" />
          <ChoiceField name="setup.hyperemicDoseUnit" label="Dose unit" testID="setup-dose-unit" options={optionsOf(doseUnitLabel)} />
        </FieldRow>
      </SectionCard>
    </>
  );
}

/** Drift: missing or out of range is said prominently, per vessel, with the window used; nothing before a vessel exists. */
function DriftCheck() {
  const { control } = useFormContext<StudySections>();
  const vessels = useWatch({ control, name: 'vessels' }) ?? [];
  const { values: t } = useThresholds();
  const low = formatQuantity(t.driftLow, 'ratio');
  const high = formatQuantity(t.driftHigh, 'ratio');
  const drift = summariseDrift(vessels, t);
  const needsAttention = drift.missing.length > 0 || drift.outside.length > 0;
  const tone = !drift.judged ? styles.driftNeutral : needsAttention ? styles.driftBad : styles.driftOk;
  return (
    <View style={[styles.drift, tone]} testID="drift-check" role={needsAttention ? 'alert' : undefined}>
      <Text weight="semibold" tone={needsAttention ? 'abnormal' : 'ink'}>
        {!drift.judged
          ? 'Drift check: recorded per vessel once a vessel is added'
          : needsAttention
            ? '▲ Drift check needs attention'
            : `✓ Drift checked for every vessel (within ${low}–${high})${drift.notDone.length ? `; not done for ${drift.notDone.map((c) => vesselShortName[c]).join(', ')}, with a reason` : ''}`}
      </Text>
      {drift.missing.map((code, i) => (
        <Text key={`${code}-${i}`} variant="caption" tone="abnormal" testID={`drift-missing-${code}`}>
          {vesselShortName[code]}: no pull-back Pd/Pa recorded. Enter it on the vessel card, or say why it was not done.
        </Text>
      ))}
      {drift.outside.map((code, i) => (
        <Text key={`${code}-out-${i}`} variant="caption" tone="abnormal" testID={`drift-outside-${code}`}>
          {vesselShortName[code]}: Pd/Pa at the guide tip outside {low}–{high}; repeat the measurement or read its values with caution.
        </Text>
      ))}
      <Text variant="caption" tone="muted">
        Pull the sensor back to the guide tip after the run: Pd/Pa there should read {low}–{high} (the lab's setting).
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  drift: { gap: space.xs, borderRadius: radius.lg, borderWidth: 1, padding: space.lg },
  driftOk: { backgroundColor: color.normalSoft, borderColor: color.normal },
  driftBad: { backgroundColor: color.abnormalSoft, borderColor: color.abnormal, borderWidth: 2 },
  driftNeutral: { backgroundColor: color.surface, borderColor: color.line },
});
