import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useFieldArray, useFormContext, useWatch } from 'react-hook-form';
import { ChoiceField, NumberField, TextField, TransitTimesField } from '../../form/fields';
import { optionsOf } from '../../form/options';
import { newId } from '../../form/new-id';
import { FieldRow, SectionCard } from '../../study/section-card';
import { useLiveAnalysis, VesselResults } from '../../study/live-results';
import { Button } from '../../ui/button';
import { ConfirmRemove } from '../../ui/confirm-remove';
import { EmptyState } from '../../ui/async-states';
import { Text } from '../../ui/text';
import { color, radius, space, touchTarget } from '../../theme';
import { vesselCodes, nhprKinds, nhprKindLabel, type VesselCode, type VesselResult } from '../../../shared/physiology';
import { emptyVessel, type StudySections } from '../../../shared/study/schema';
import { displayDecimals } from '../../../shared/physiology/precision';
import {
  coronarySegments,
  decisionLabel,
  pullbackPatternLabel,
  segmentModelName,
  timiFlowGrades,
  timiFlowLabel,
  vesselLabel,
  vesselShortName,
} from '../../../shared/study/vocabulary';


/** Vessels: one card per vessel studied, with its pressures, transit times and live indices. */
export default function VesselsSection() {
  const { control } = useFormContext<StudySections>();
  const { fields, append, remove } = useFieldArray({ control, name: 'vessels', keyName: 'key' });
  const { result } = useLiveAnalysis();
  const [picking, setPicking] = useState(false);
  return (
    <>
      {fields.length === 0 ? <EmptyState title="No vessel yet" detail="Add the first vessel you measured." testID="vessels-empty" /> : null}
      {fields.map((f, i) => (
        <VesselCard key={f.key} index={i} onRemove={() => remove(i)} result={result?.vessels.find((v) => v.id === f.id)} />
      ))}
      {picking ? (
        <SectionCard title="Which vessel?" testID="vessel-picker">
          <View style={styles.pick} role="radiogroup" aria-label="Vessel to add">
            {vesselCodes.map((code) => (
              <Pressable
                key={code}
                testID={`add-vessel-${code}`}
                role="button"
                accessibilityLabel={`Add ${vesselLabel[code]}`}
                onPress={() => {
                  append(emptyVessel(newId(), code));
                  setPicking(false);
                }}
                style={styles.pickItem}
              >
                <Text weight="semibold">{vesselShortName[code]}</Text>
                <Text variant="caption" tone="muted">
                  {vesselLabel[code]}
                </Text>
              </Pressable>
            ))}
          </View>
          <Button kind="secondary" label="Cancel" testID="add-vessel-cancel" onPress={() => setPicking(false)} />
        </SectionCard>
      ) : (
        <Button testID="add-vessel" label={fields.length ? 'Add another vessel' : 'Add a vessel'} onPress={() => setPicking(true)} />
      )}
    </>
  );
}

function VesselCard({ index, onRemove, result }: { index: number; onRemove: () => void; result: VesselResult | undefined }) {
  const { control } = useFormContext<StudySections>();
  const vessel = useWatch({ control, name: `vessels.${index}.vessel` }) as VesselCode;
  const p = `vessels.${index}`;
  const t = `vessel-${index}`;
  const segments = coronarySegments.filter((s) => s.vessel === vessel);
  return (
    <SectionCard
      title={`${vesselShortName[vessel]} · ${vesselLabel[vessel]}`}
      testID={`vessel-card-${index}`}
      aside={<ConfirmRemove what={`the ${vesselLabel[vessel]} and its measurements`} onConfirm={onRemove} testID={`${t}-remove`} />}
    >
      <VesselResults result={result} testID={`${t}-results`} />
      <FieldRow>
        <ChoiceField
          name={`${p}.segment`}
          label={`Segment (${segmentModelName})`}
          testID={`${t}-segment`}
          options={(segments.length ? segments : coronarySegments).map((s) => ({ value: s.code, label: `${s.code} ${s.label}` }))}
        />
        <NumberField name={`${p}.visualStenosisPct`} label="Visual stenosis" unit="%" testID={`${t}-stenosis`} />
      </FieldRow>
      <FieldRow>
        <ChoiceField name={`${p}.timiFlow`} label="TIMI flow" testID={`${t}-timi`} options={timiFlowGrades.map((g) => ({ value: g, label: timiFlowLabel[g] }))} />
        <NumberField name={`${p}.correctedFrameCount`} label="Corrected TIMI frame count" unit="frames" testID={`${t}-cfc`} />
      </FieldRow>
      <Text weight="semibold">At rest</Text>
      <FieldRow>
        <NumberField name={`${p}.restPa`} label="Pa" accessibleLabel="Pa at rest" decimals={displayDecimals.pressure} unit="mmHg" testID={`${t}-rest-pa`} />
        <NumberField name={`${p}.restPd`} label="Pd" accessibleLabel="Pd at rest" decimals={displayDecimals.pressure} unit="mmHg" testID={`${t}-rest-pd`} />
      </FieldRow>
      <TransitTimesField name={`${p}.restTransit`} label="Transit time at rest" testID={`${t}-rest-tmn`} />
      <FieldRow>
        <ChoiceField name={`${p}.nhprKind`} label="Resting ratio from the console" testID={`${t}-nhpr-kind`} options={nhprKinds.map((k) => ({ value: k, label: nhprKindLabel[k] }))} />
        <NumberField name={`${p}.nhprValue`} label="Resting ratio value" decimals={displayDecimals.ratio} testID={`${t}-nhpr-value`} />
      </FieldRow>
      <Text weight="semibold">At hyperaemia</Text>
      <FieldRow>
        <NumberField name={`${p}.hyperemiaPa`} label="Pa" accessibleLabel="Pa at hyperaemia" decimals={displayDecimals.pressure} unit="mmHg" testID={`${t}-hyp-pa`} />
        <NumberField name={`${p}.hyperemiaPd`} label="Pd" accessibleLabel="Pd at hyperaemia" decimals={displayDecimals.pressure} unit="mmHg" testID={`${t}-hyp-pd`} />
        <NumberField name={`${p}.consoleFfr`} label="FFR from the console" decimals={displayDecimals.ratio} hint="Only when pressures were not entered" testID={`${t}-console-ffr`} />
      </FieldRow>
      <TransitTimesField name={`${p}.hyperemiaTransit`} label="Transit time at hyperaemia" testID={`${t}-hyp-tmn`} />
      <FieldRow>
        <NumberField name={`${p}.wedgePressure`} label="Coronary wedge pressure" unit="mmHg" hint="During balloon occlusion, if measured" testID={`${t}-wedge`} />
        <NumberField name={`${p}.driftPdPa`} label="Drift check at pull-back (Pd/Pa)" decimals={displayDecimals.ratio} hint="Sensor at the guide tip after the run" testID={`${t}-drift`} />
      </FieldRow>
      <TextField name={`${p}.driftNotDoneReason`} label="Drift check not done: why" hint="Only when no pull-back Pd/Pa was recorded" testID={`${t}-drift-not-done`} />
      <ChoiceField name={`${p}.pullbackPattern`} label="Pull-back pattern" testID={`${t}-pullback`} options={optionsOf(pullbackPatternLabel)} />
      <ChoiceField name={`${p}.decision`} label="Decision" testID={`${t}-decision`} options={optionsOf(decisionLabel)} />
    </SectionCard>
  );
}

const styles = StyleSheet.create({
  pick: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  pickItem: { minHeight: touchTarget, minWidth: 128, padding: space.sm, borderWidth: 1, borderColor: color.line, borderRadius: radius.md, backgroundColor: color.surface },
});
