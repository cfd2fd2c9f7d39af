import { StyleSheet, View } from 'react-native';
import { useFormContext, useWatch } from 'react-hook-form';
import { ChoiceField, NumberField, YesNoField } from '../../../../components/form/fields';
import { optionsOf } from '../../../../components/form/options';
import { FieldRow, SectionCard } from '../../../../components/study/section-card';
import { Text } from '../../../../components/ui/text';
import { color, radius, space } from '../../../../components/theme';
import { useLiveAnalysis } from '../../../../components/study/live-results';
import { defaultThresholds } from '../../../../shared/physiology';
import type { StudySections } from '../../../../shared/study/schema';
import { doseUnitLabel, drugRouteLabel, hyperemicAgentLabel, vesselLabel, wirePositionLabel } from '../../../../shared/study/vocabulary';

/** Setup & quality: the steps that make the numbers trustworthy, and the drift check of every vessel. */
export default function SetupSection() {
  return (
    <>
      <DriftCheck />
      <SectionCard title="Before measuring" testID="card-setup">
        <YesNoField name="setup.transducerZeroed" label="Transducer zeroed at heart level" testID="setup-zeroed" />
        <FieldRow>
          <YesNoField name="setup.nitratesGiven" label="Nitrates before wiring" testID="setup-nitrates" />
          <NumberField name="setup.nitrateDoseMicrograms" label="Nitrate dose" unit="µg" testID="setup-nitrate-dose" />
        </FieldRow>
        <FieldRow>
          <YesNoField name="setup.equalizedInAorta" label="Pressures equalized in the aorta" testID="setup-equalized" />
          <YesNoField name="setup.introducerRemoved" label="Introducer removed before equalizing" testID="setup-introducer" />
        </FieldRow>
        <ChoiceField name="setup.wirePosition" label="Wire sensor position" testID="setup-wire" options={optionsOf(wirePositionLabel)} />
        <NumberField name="setup.heparinUnits" label="Heparin" unit="U" integer testID="setup-heparin" />
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

/** Drift: missing or out of range is said prominently, per vessel, with the window used. */
function DriftCheck() {
  const { control } = useFormContext<StudySections>();
  const vessels = useWatch({ control, name: 'vessels' }) ?? [];
  const { result } = useLiveAnalysis();
  const low = defaultThresholds.driftLow;
  const high = defaultThresholds.driftHigh;
  const missing = vessels.filter((v) => v.driftPdPa == null);
  const outOfRange = (result?.vessels ?? []).filter((v) => v.warnings.some((w) => w.code === 'drift-out-of-range'));
  const ok = vessels.length > 0 && missing.length === 0 && outOfRange.length === 0;
  return (
    <View style={[styles.drift, ok ? styles.driftOk : styles.driftBad]} testID="drift-check" role={ok ? undefined : 'alert'}>
      <Text weight="semibold" tone={ok ? 'ink' : 'abnormal'}>
        {vessels.length === 0
          ? '▲ Drift check: no vessel measured yet'
          : ok
            ? `✓ Drift checked for every vessel (within ${low.toFixed(2)}–${high.toFixed(2)})`
            : '▲ Drift check needs attention'}
      </Text>
      {missing.map((v) => (
        <Text key={v.id} variant="caption" tone="abnormal" testID={`drift-missing-${v.vessel}`}>
          {vesselLabel[v.vessel]}: no pull-back Pd/Pa recorded. Enter it on the vessel card.
        </Text>
      ))}
      {outOfRange.map((v) => (
        <Text key={v.id} variant="caption" tone="abnormal">
          {v.warnings.find((w) => w.code === 'drift-out-of-range')!.message}
        </Text>
      ))}
      <Text variant="caption" tone="muted">
        Pull the sensor back to the guide tip after the run: Pd/Pa there should read {low.toFixed(2)}–{high.toFixed(2)}; outside it, repeat
        the measurement.
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  drift: { gap: space.xs, borderRadius: radius.lg, borderWidth: 1, padding: space.lg },
  driftOk: { backgroundColor: color.normalSoft, borderColor: color.normal },
  driftBad: { backgroundColor: color.abnormalSoft, borderColor: color.abnormal, borderWidth: 2 },
});
