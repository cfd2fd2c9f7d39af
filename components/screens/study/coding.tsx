import { useFieldArray, useFormContext, useWatch } from 'react-hook-form';
import { ChoiceField, type Option } from '../../form/fields';
import { newId } from '../../form/new-id';
import { FieldRow, SectionCard } from '../../study/section-card';
import { Button } from '../../ui/button';
import { ConfirmRemove } from '../../ui/confirm-remove';
import { EmptyState } from '../../ui/async-states';
import { Text } from '../../ui/text';
import { vesselCodes, vesselShortName } from '../../../shared/physiology';
import type { StudySections } from '../../../shared/study/schema';

const vesselOptions = vesselCodes.map((v) => ({ value: v, label: vesselShortName[v] }));
const yesNo: Option<boolean>[] = [
  { value: true, label: 'Yes' },
  { value: false, label: 'No' },
];
const kindOptions: Option<StudySections['coding']['interventions'][number]['kind']>[] = [
  { value: 'balloon', label: 'Balloon angioplasty' },
  { value: 'stent', label: 'Stent' },
  { value: 'atherectomy', label: 'Atherectomy' },
  { value: 'atherectomy-stent', label: 'Atherectomy with stent' },
];

/**
 * Coding: what the codes depend on beyond the measurements — the encounter, the diagnostic
 * catheterization done in the same session, and the interventions. Nothing is pre-filled: until
 * the encounter and the catheterization are answered, the suggestions carry a warning and the
 * code review cannot be completed.
 */
export default function CodingSection() {
  const { control } = useFormContext<StudySections>();
  const { fields, append, remove } = useFieldArray({ control, name: 'coding.interventions', keyName: 'key' });
  const cath = useWatch({ control, name: 'coding.diagnosticCath' });
  const leftHeart = useWatch({ control, name: 'coding.leftHeart' });
  const interventions = useWatch({ control, name: 'coding.interventions' }) ?? [];
  return (
    <>
      <SectionCard title="Encounter" testID="card-encounter">
        <Text variant="caption" tone="muted">
          How this session is billed. Left unanswered, the code suggestions say so and the review cannot be completed.
        </Text>
        <ChoiceField
          name="coding.patientClass"
          label="Patient class"
          testID="coding-patient-class"
          options={[
            { value: 'outpatient', label: 'Outpatient' },
            { value: 'inpatient', label: 'Inpatient' },
          ]}
        />
        <ChoiceField
          name="coding.billing"
          label="Billing context"
          hint="Professional: the physician's claim. Facility: the hospital's claim."
          testID="coding-billing"
          options={[
            { value: 'professional', label: 'Professional' },
            { value: 'facility', label: 'Facility' },
          ]}
        />
        <ChoiceField
          name="coding.setting"
          label="Setting"
          testID="coding-setting"
          options={[
            { value: 'hospital', label: 'Hospital' },
            { value: 'office', label: 'Office' },
          ]}
        />
      </SectionCard>

      <SectionCard title="Diagnostic catheterization" testID="card-diagnostic-cath">
        <ChoiceField
          name="coding.diagnosticCath"
          label="Diagnostic catheterization in this session"
          hint="“None” is an answer: choose it when only physiology or an intervention was done."
          testID="coding-diagnostic-cath"
          options={[
            { value: 'done', label: 'Done' },
            { value: 'none', label: 'None' },
          ]}
        />
        {cath === 'done' ? (
          <>
            <FieldRow>
              <ChoiceField name="coding.coronaryAngiography" label="Coronary angiography" testID="coding-coronary-angiography" options={yesNo} allowClear={false} />
              <ChoiceField name="coding.graftAngiography" label="Bypass graft angiography" testID="coding-graft-angiography" options={yesNo} allowClear={false} />
            </FieldRow>
            <FieldRow>
              <ChoiceField name="coding.leftHeart" label="Left heart catheterization" testID="coding-left-heart" options={yesNo} allowClear={false} />
              <ChoiceField name="coding.rightHeart" label="Right heart catheterization" testID="coding-right-heart" options={yesNo} allowClear={false} />
            </FieldRow>
            {leftHeart ? (
              <ChoiceField
                name="coding.leftVentriculography"
                label="Left ventriculography"
                hint="Included in the left heart catheterization; it is not coded on its own."
                testID="coding-left-ventriculography"
                options={yesNo}
                allowClear={false}
              />
            ) : null}
          </>
        ) : null}
      </SectionCard>

      <SectionCard title="Coronary interventions" testID="card-interventions">
        <Text variant="caption" tone="muted">
          One row per treated vessel or branch, with what was done there. A branch (a diagonal, a marginal…) is recorded under its
          major vessel with “Branch” set.
        </Text>
        {fields.length === 0 ? <EmptyState title="No intervention recorded" detail="Add one for each vessel or branch treated in this session." testID="interventions-empty" /> : null}
        {fields.map((f, i) => {
          const p = `coding.interventions.${i}` as const;
          const kind = interventions[i]?.kind;
          return (
            <SectionCard
              key={f.key}
              title={`Intervention ${i + 1}`}
              testID={`intervention-card-${i}`}
              aside={<ConfirmRemove what={`intervention ${i + 1}`} onConfirm={() => remove(i)} testID={`intervention-${i}-remove`} />}
            >
              <ChoiceField name={`${p}.vessel`} label="Vessel" testID={`intervention-${i}-vessel`} options={vesselOptions} allowClear={false} />
              <ChoiceField name={`${p}.kind`} label="Treatment" testID={`intervention-${i}-kind`} options={kindOptions} allowClear={false} />
              <FieldRow>
                <ChoiceField name={`${p}.branch`} label="Branch of the major vessel" testID={`intervention-${i}-branch`} options={yesNo} allowClear={false} />
                {kind === 'stent' || kind === 'atherectomy-stent' ? (
                  <ChoiceField
                    name={`${p}.stent`}
                    label="Stent type"
                    testID={`intervention-${i}-stent`}
                    options={[
                      { value: 'drug-eluting', label: 'Drug-eluting' },
                      { value: 'bare-metal', label: 'Bare-metal' },
                    ]}
                  />
                ) : null}
              </FieldRow>
            </SectionCard>
          );
        })}
        <Button
          label="Add an intervention"
          kind="secondary"
          testID="intervention-add"
          onPress={() => append({ id: newId(), vessel: interventions[interventions.length - 1]?.vessel ?? 'LAD', kind: 'stent', branch: false, stent: null })}
        />
      </SectionCard>

      <SectionCard title="Diagnosis" testID="card-coding-diagnosis">
        <ChoiceField
          name="coding.angina"
          label="Angina documented by the physician"
          hint="Not recorded: the angina answer of the patient section is used."
          testID="coding-angina"
          options={yesNo}
        />
      </SectionCard>
    </>
  );
}
