import { useFieldArray, useFormContext, useWatch } from 'react-hook-form';
import { ChoiceField, NumberField, YesNoField } from '../../form/fields';
import { DateTimeField } from '../../form/date-time-field';
import { optionsOf } from '../../form/options';
import { newId } from '../../form/new-id';
import { FieldRow, SectionCard } from '../../study/section-card';
import { useLiveAnalysis } from '../../study/live-results';
import { Button } from '../../ui/button';
import { ConfirmRemove } from '../../ui/confirm-remove';
import { EmptyState } from '../../ui/async-states';
import { Text } from '../../ui/text';
import { classifyDose, vasoreactivityLabel, vesselCodes, vesselShortName } from '../../../shared/physiology';
import { emptyDose, type AcetylcholineDose, type StudySections } from '../../../shared/study/schema';
import { coronarySegments, rhythmLabel, spasmPatternLabel } from '../../../shared/study/vocabulary';

/** Left-coronary acetylcholine protocol doses (ESC 2024 protocol figure); lower doses in the right coronary. */
const protocolMicrograms = [2, 20, 100, 200];

const vesselOptions = vesselCodes.map((v) => ({ value: v, label: vesselShortName[v] }));

/** This dose's own outcome, once its observations are all there. */
function doseOutcome(d: AcetylcholineDose | undefined, t: Parameters<typeof classifyDose>[1]) {
  if (!d || typeof d.micrograms !== 'number' || typeof d.constrictionPct !== 'number' || !Number.isFinite(d.constrictionPct) || d.symptoms === null || d.ischemicEcg === null) return null;
  return classifyDose({ vessel: d.vessel, micrograms: d.micrograms, constrictionPct: d.constrictionPct, symptoms: d.symptoms, ischemicEcg: d.ischemicEcg }, t);
}

/** Vasoreactivity: each acetylcholine dose with the angiographic response, symptoms and ECG. */
export default function VasoreactivitySection() {
  const { control, getValues } = useFormContext<StudySections>();
  const { fields, append, remove } = useFieldArray({ control, name: 'vasoreactivity.doses', keyName: 'key' });
  const doses = useWatch({ control, name: 'vasoreactivity.doses' }) ?? [];
  const { result, thresholds } = useLiveAnalysis();
  const addNext = () => {
    const doses = getValues('vasoreactivity.doses');
    const last = doses[doses.length - 1];
    const next = protocolMicrograms.find((m) => !last?.micrograms || m > last.micrograms) ?? null;
    append({ ...emptyDose(newId(), last?.vessel ?? 'LAD'), micrograms: next });
  };
  return (
    <>
      <SectionCard title="Acetylcholine doses" testID="card-doses">
        <Text variant="caption" tone="muted">
          Usual left coronary protocol: 2, 20, 100, 200 µg, each over about a minute with an angiogram after it; stop at spasm, then
          intracoronary nitroglycerin. Stop calcium-channel blockers and nitrates 24 h before.
        </Text>
        {fields.length === 0 ? <EmptyState title="No dose recorded" detail="Add the first dose when it is given." testID="doses-empty" /> : null}
        {fields.map((f, i) => {
          const p = `vasoreactivity.doses.${i}`;
          const outcome = doseOutcome(doses[i], thresholds);
          return (
            <SectionCard
              key={f.key}
              title={`Dose ${i + 1}`}
              testID={`dose-card-${i}`}
              aside={<ConfirmRemove what={`dose ${i + 1}`} onConfirm={() => remove(i)} testID={`dose-${i}-remove`} />}
            >
              <ChoiceField name={`${p}.vessel`} label="Injected into" testID={`dose-${i}-vessel`} options={vesselOptions} allowClear={false} />
              <FieldRow>
                <NumberField name={`${p}.micrograms`} label="Dose" unit="µg" testID={`dose-${i}-micrograms`} />
                <NumberField name={`${p}.constrictionPct`} label="Diameter reduction vs baseline" unit="%" testID={`dose-${i}-constriction`} />
              </FieldRow>
              <FieldRow>
                <YesNoField name={`${p}.symptoms`} label="Usual symptoms reproduced" testID={`dose-${i}-symptoms`} />
                <YesNoField name={`${p}.ischemicEcg`} label="Ischaemic ECG changes" testID={`dose-${i}-ecg`} />
              </FieldRow>
              <FieldRow>
                <NumberField name={`${p}.heartRate`} label="Heart rate" unit="bpm" integer testID={`dose-${i}-hr`} />
                <NumberField name={`${p}.systolic`} label="Systolic" unit="mmHg" integer testID={`dose-${i}-systolic`} />
                <NumberField name={`${p}.diastolic`} label="Diastolic" unit="mmHg" integer testID={`dose-${i}-diastolic`} />
              </FieldRow>
              <ChoiceField name={`${p}.rhythm`} label="Rhythm" testID={`dose-${i}-rhythm`} options={optionsOf(rhythmLabel)} />
              <ChoiceField name={`${p}.spasmVessel`} label="Constriction seen in" hint="Where the narrowing was seen, if not where the drug went" testID={`dose-${i}-spasm-vessel`} options={vesselOptions} />
              <FieldRow>
                <ChoiceField
                  name={`${p}.spasmSegment`}
                  label="Segment"
                  testID={`dose-${i}-spasm-segment`}
                  options={coronarySegments
                    .filter((s) => !doses[i]?.spasmVessel || s.vessel === doses[i]?.spasmVessel)
                    .map((s) => ({ value: s.code, label: `${s.code} ${s.label}` }))}
                />
                <ChoiceField name={`${p}.spasmPattern`} label="Pattern" testID={`dose-${i}-spasm-pattern`} options={optionsOf(spasmPatternLabel)} />
              </FieldRow>
              <Text weight="semibold" testID={`dose-${i}-result`} aria-live="polite">
                {outcome ? `This dose: ${vasoreactivityLabel[outcome].toLowerCase()}` : 'This dose: outcome shown once constriction, symptoms and ECG are entered'}
              </Text>
            </SectionCard>
          );
        })}
        <Button testID="add-dose" label={fields.length ? 'Add the next dose' : 'Add a dose'} onPress={addNext} />
      </SectionCard>
      <SectionCard title="After the doses" testID="card-reversal">
        {result?.vasoreactivity ? (
          <Text weight="semibold" testID="acetylcholine-summary">
            Acetylcholine test overall: {vasoreactivityLabel[result.vasoreactivity.result].toLowerCase()}
          </Text>
        ) : null}
        <YesNoField name="vasoreactivity.nitrateReversal" label="Spasm reversed with nitroglycerin" testID="dose-nitrate-reversal" />
        <FieldRow>
          <NumberField name="vasoreactivity.reversalNitroglycerinMicrograms" label="Nitroglycerin given" unit="µg" testID="dose-reversal-ntg" />
          <DateTimeField name="vasoreactivity.reversalNitroglycerinAt" label="At" testID="dose-reversal-ntg-at" />
        </FieldRow>
        {(result?.warnings ?? []).map((w) => (
          <Text key={w.message} variant="caption" tone="abnormal">
            ⚠ {w.message}
          </Text>
        ))}
      </SectionCard>
    </>
  );
}
