import { StyleSheet, View } from 'react-native';
import { useRouter } from 'expo-router';
import { FormProvider, useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { createStudySchema, type CreateStudy } from '../../shared/study/schema';
import { clinicalQuestionLabel, sexLabel } from '../../shared/study/vocabulary';
import { applyFieldErrors } from '../form/apply-field-errors';
import { ChoiceField, TextField } from '../form/fields';
import { optionsOf } from '../form/options';
import { FieldRow, SectionCard } from '../study/section-card';
import { Button } from '../ui/button';
import { Center, Content } from '../ui/layout';
import { Text } from '../ui/text';
import { PageHeader } from '../page-header';
import { ApiError } from '../data/api';
import { useCreateStudy } from '../data/study-query';
import { space } from '../theme';

/** Opens a study: who the patient is and why they are here; the rest is recorded as the case runs. */
export default function NewStudyPage() {
  const router = useRouter();
  const create = useCreateStudy();
  const form = useForm<CreateStudy>({
    resolver: zodResolver(createStudySchema),
    mode: 'onTouched',
    defaultValues: { patient: { mrn: '', familyName: '', givenName: '', birthDate: '', sex: 'unknown' }, details: { indication: null, clinicalQuestion: null } },
  });
  const submit = form.handleSubmit(async (values) => {
    try {
      const study = await create.mutateAsync(values);
      router.replace(`/studies/${study.id}/setup`);
    } catch (error) {
      const rest = error instanceof ApiError ? applyFieldErrors(error, (name, e) => form.setError(name as never, e)) : ['The study could not be opened.'];
      if (rest.length) form.setError('root', { message: rest.join(' ') });
    }
  });
  return (
    <Content>
      <Center style={styles.center}>
        <PageHeader title="New study" subtitle="Who the patient is and why they are here. Everything else is saved as you go." />
        <FormProvider {...form}>
          <SectionCard title="Patient" testID="new-patient">
            <FieldRow>
              <TextField name="patient.mrn" label="MRN" testID="new-mrn" />
              <TextField name="patient.birthDate" label="Birth date" hint="YYYY-MM-DD" testID="new-birth-date" />
            </FieldRow>
            <FieldRow>
              <TextField name="patient.familyName" label="Family name" testID="new-family-name" />
              <TextField name="patient.givenName" label="Given name" testID="new-given-name" />
            </FieldRow>
            <ChoiceField name="patient.sex" label="Sex" testID="new-sex" options={optionsOf(sexLabel)} allowClear={false} />
          </SectionCard>
          <SectionCard title="Indication" testID="new-indication-card">
            <TextField name="details.indication" label="Indication" multiline testID="new-indication" />
            <ChoiceField name="details.clinicalQuestion" label="Clinical question" testID="new-question" options={optionsOf(clinicalQuestionLabel)} />
          </SectionCard>
        </FormProvider>
        {form.formState.errors.root ? (
          <Text tone="abnormal" role="alert">
            ▲ {form.formState.errors.root.message}
          </Text>
        ) : null}
        <View style={styles.actions}>
          <Button testID="new-study-submit" label={create.isPending ? 'Opening…' : 'Open the study'} onPress={() => void submit()} disabled={create.isPending} />
          <Button testID="new-study-cancel" kind="secondary" label="Cancel" onPress={() => router.back()} />
        </View>
      </Center>
    </Content>
  );
}

const styles = StyleSheet.create({
  center: { gap: space.xl, maxWidth: 760 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
});
