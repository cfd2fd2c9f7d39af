import { NumberField, TextField } from '../../../../components/form/fields';
import { FieldRow, SectionCard } from '../../../../components/study/section-card';

/** Findings & plan: complications, radiation and contrast, and the physician's impression and plan. */
export default function FindingsSection() {
  return (
    <>
      <SectionCard title="Procedure" testID="card-procedure">
        <TextField name="findings.complications" label="Complications" multiline hint="Write “None” when there were none." testID="findings-complications" />
        <FieldRow>
          <NumberField name="findings.contrastMl" label="Contrast" unit="mL" testID="findings-contrast" />
          <NumberField name="findings.fluoroscopyMinutes" label="Fluoroscopy time" unit="min" testID="findings-fluoroscopy" />
        </FieldRow>
      </SectionCard>
      <SectionCard title="Impression and plan" testID="card-impression">
        <TextField name="findings.impression" label="Impression" multiline testID="findings-impression" />
        <TextField name="findings.plan" label="Plan" multiline testID="findings-plan" />
      </SectionCard>
    </>
  );
}
