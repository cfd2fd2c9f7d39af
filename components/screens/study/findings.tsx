import { MultiChoiceField, NumberField, TextField } from '../../form/fields';
import { optionsOf } from '../../form/options';
import { FieldRow, SectionCard } from '../../study/section-card';
import { complicationLabel } from '../../../shared/study/vocabulary';

/** Findings & plan: complications, radiation and contrast, and the physician's impression and plan. */
export default function FindingsSection() {
  return (
    <>
      <SectionCard title="Procedure" testID="card-procedure">
        <MultiChoiceField
          name="findings.complicationKinds"
          label="Complications"
          hint="Choose “None” when there were none: an empty answer is read as not recorded."
          options={optionsOf(complicationLabel)}
          exclusive="none"
          testID="findings-complication-kinds"
        />
        <TextField name="findings.complications" label="Complication details" multiline testID="findings-complications" />
        <FieldRow>
          <NumberField name="findings.contrastMl" label="Contrast" unit="mL" testID="findings-contrast" />
          <NumberField name="findings.fluoroscopyMinutes" label="Fluoroscopy time" unit="min" testID="findings-fluoroscopy" />
        </FieldRow>
        <FieldRow>
          <NumberField name="findings.airKermaMGy" label="Air kerma" unit="mGy" testID="findings-air-kerma" />
          <NumberField name="findings.doseAreaProductGyCm2" label="Dose-area product" unit="Gy·cm²" testID="findings-dap" />
        </FieldRow>
      </SectionCard>
      <SectionCard title="Impression and plan" testID="card-impression">
        <TextField name="findings.impression" label="Impression" multiline testID="findings-impression" />
        <TextField name="findings.plan" label="Plan" multiline testID="findings-plan" />
      </SectionCard>
    </>
  );
}
