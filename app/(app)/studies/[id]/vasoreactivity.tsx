import { useFieldArray, useFormContext } from 'react-hook-form';
import { ChoiceField, NumberField, YesNoField } from '../../../../components/form/fields';
import { newId } from '../../../../components/form/new-id';
import { FieldRow, SectionCard } from '../../../../components/study/section-card';
import { useLiveAnalysis } from '../../../../components/study/live-results';
import { Button } from '../../../../components/ui/button';
import { ConfirmRemove } from '../../../../components/ui/confirm-remove';
import { EmptyState } from '../../../../components/ui/async-states';
import { Text } from '../../../../components/ui/text';
import { vesselCodes } from '../../../../shared/physiology';
import { emptyDose, type StudySections } from '../../../../shared/study/schema';

/** Left-coronary acetylcholine protocol doses (ESC 2024 protocol figure); lower doses in the right coronary. */
const protocolMicrograms = [2, 20, 100, 200];

/** Vasoreactivity: each acetylcholine dose with the angiographic response, symptoms and ECG. */
export default function VasoreactivitySection() {
  const { control, getValues } = useFormContext<StudySections>();
  const { fields, append, remove } = useFieldArray({ control, name: 'vasoreactivity.doses', keyName: 'key' });
  const { result } = useLiveAnalysis();
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
          const outcome = result?.doseResults?.[i]?.result;
          return (
            <SectionCard
              key={f.key}
              title={`Dose ${i + 1}`}
              testID={`dose-card-${i}`}
              aside={<ConfirmRemove what={`dose ${i + 1}`} onConfirm={() => remove(i)} testID={`dose-${i}-remove`} />}
            >
              <ChoiceField name={`${p}.vessel`} label="Into" testID={`dose-${i}-vessel`} options={vesselCodes.map((v) => ({ value: v, label: v }))} allowClear={false} />
              <FieldRow>
                <NumberField name={`${p}.micrograms`} label="Dose" unit="µg" testID={`dose-${i}-micrograms`} />
                <NumberField name={`${p}.constrictionPct`} label="Diameter reduction vs baseline" unit="%" testID={`dose-${i}-constriction`} />
              </FieldRow>
              <FieldRow>
                <YesNoField name={`${p}.symptoms`} label="Usual symptoms reproduced" testID={`dose-${i}-symptoms`} />
                <YesNoField name={`${p}.ischemicEcg`} label="Ischaemic ECG changes" testID={`dose-${i}-ecg`} />
              </FieldRow>
              {outcome ? (
                <Text weight="semibold" testID={`dose-${i}-result`}>
                  Response: {outcome.replaceAll('-', ' ')}
                </Text>
              ) : null}
            </SectionCard>
          );
        })}
        <Button testID="add-dose" label={fields.length ? 'Add the next dose' : 'Add a dose'} onPress={addNext} />
      </SectionCard>
      <SectionCard title="After the doses" testID="card-reversal">
        <YesNoField name="vasoreactivity.nitrateReversal" label="Spasm reversed with nitrates" testID="dose-nitrate-reversal" />
        {(result?.warnings ?? []).map((w) => (
          <Text key={w.message} variant="caption" tone="abnormal">
            ⚠ {w.message}
          </Text>
        ))}
      </SectionCard>
    </>
  );
}
