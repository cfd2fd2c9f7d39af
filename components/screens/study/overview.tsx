import { ChoiceField, NumberField, TextField, YesNoField } from '../../form/fields';
import { DateTimeField } from '../../form/date-time-field';
import { optionsOf } from '../../form/options';
import { FieldRow, SectionCard } from '../../study/section-card';
import { useOperators } from '../../data/study-query';
import { accessSiteLabel, anginaCharacterLabel, clinicalQuestionLabel, sexLabel } from '../../../shared/study/vocabulary';

/** Patient & indication. */
export default function OverviewSection() {
  const operators = useOperators();
  return (
    <>
      <SectionCard title="Patient" testID="card-patient">
        <FieldRow>
          <TextField name="patient.mrn" label="MRN" testID="patient-mrn" />
          <TextField name="patient.familyName" label="Family name" testID="patient-family-name" />
          <TextField name="patient.givenName" label="Given name" testID="patient-given-name" />
        </FieldRow>
        <FieldRow>
          <TextField name="patient.birthDate" label="Birth date" hint="YYYY-MM-DD" testID="patient-birth-date" />
          <ChoiceField name="patient.sex" label="Sex" testID="patient-sex" options={optionsOf(sexLabel)} allowClear={false} />
        </FieldRow>
      </SectionCard>
      <SectionCard title="Case" testID="card-case">
        <FieldRow>
          <TextField name="details.encounter" label="Encounter" testID="details-encounter" />
          <DateTimeField name="details.procedureStartedAt" label="Procedure start" testID="details-started" />
          <DateTimeField name="details.procedureEndedAt" label="Procedure end" testID="details-ended" />
        </FieldRow>
        <ChoiceField
          name="details.operatorId"
          label="Operator"
          testID="details-operator"
          options={(operators.data?.items ?? []).map((o) => ({ value: o.id, label: o.displayName }))}
          hint={operators.isPending ? 'Loading physicians…' : undefined}
        />
        <FieldRow>
          <TextField name="details.referringName" label="Referring clinician" testID="details-referring-name" />
          <TextField name="details.referringEmail" label="Referring clinician's e-mail" keyboard="email" testID="details-referring-email" />
        </FieldRow>
        <FieldRow>
          <NumberField name="details.weightKg" label="Weight" unit="kg" testID="details-weight" />
          <NumberField name="details.heightCm" label="Height" unit="cm" testID="details-height" />
        </FieldRow>
        <TextField name="details.indication" label="Indication" multiline testID="details-indication" />
        <FieldRow>
          <YesNoField name="details.anginaPresent" label="Angina" testID="details-angina" />
          <ChoiceField name="details.anginaCharacter" label="Angina character" testID="details-angina-character" options={optionsOf(anginaCharacterLabel)} />
        </FieldRow>
        <ChoiceField name="details.clinicalQuestion" label="Clinical question" testID="details-question" options={optionsOf(clinicalQuestionLabel)} />
        <FieldRow>
          <ChoiceField name="details.accessSite" label="Access site" testID="details-access" options={optionsOf(accessSiteLabel)} />
          <NumberField name="details.guideFrench" label="Guide catheter" unit="Fr" integer testID="details-guide" />
        </FieldRow>
      </SectionCard>
    </>
  );
}
