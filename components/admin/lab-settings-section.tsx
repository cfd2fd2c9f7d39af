import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { FormProvider, useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { labSettingsFormSchema, type LabSettingsForm, type LabSettingsView } from '../../shared/settings/lab-settings';
import { ApiError } from '../data/api';
import { useLabSettingsQuery, useSaveLabSettings } from '../data/admin-query';
import { NumberField, TextField } from '../form/fields';
import { formatDateTime } from '../format';
import { FieldRow, SectionCard } from '../study/section-card';
import { ErrorState, LoadingState } from '../ui/async-states';
import { Button } from '../ui/button';
import { Text } from '../ui/text';
import { space } from '../theme';
import { applyFieldErrors } from '../form/apply-field-errors';

const fields = ['timeZone', 'signatureTargetHours', 'ehrBaseUrl', 'mailFrom'] as const;

/** The lab's time zone, signature target, EHR endpoint and mail sender, checked by the shared schema. */
export function LabSettingsSection() {
  const settings = useLabSettingsQuery();
  return (
    <SectionCard title="Lab settings" testID="admin-lab-settings">
      {settings.isPending ? (
        <LoadingState label="Loading settings…" testID="lab-settings-loading" />
      ) : settings.isError ? (
        <ErrorState title="Settings could not be loaded" detail={settings.error.message} onRetry={() => void settings.refetch()} testID="lab-settings-error" />
      ) : (
        <LabSettingsForm view={settings.data} onReload={() => void settings.refetch()} />
      )}
    </SectionCard>
  );
}

const formOf = (v: LabSettingsView): LabSettingsForm => ({ timeZone: v.stored.timeZone, signatureTargetHours: v.stored.signatureTargetHours, ehrBaseUrl: v.stored.ehrBaseUrl, mailFrom: v.stored.mailFrom });

function LabSettingsForm({ view, onReload }: { view: LabSettingsView; onReload: () => void }) {
  const form = useForm<LabSettingsForm>({ resolver: zodResolver(labSettingsFormSchema), defaultValues: formOf(view), mode: 'onBlur' });
  const save = useSaveLabSettings();
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string; stale?: boolean } | null>(null);
  useEffect(() => form.reset(formOf(view)), [view, form]);

  const submit = form.handleSubmit(async (settings) => {
    setMessage(null);
    try {
      await save.mutateAsync({ settings, version: view.version });
      setMessage({ tone: 'ok', text: 'Saved. Deliveries, notices and turnaround use the new settings from now on.' });
    } catch (error) {
      if (error instanceof ApiError && error.status === 409) return setMessage({ tone: 'error', text: error.message, stale: true });
      const rest = applyFieldErrors(error, (n, e) => form.setError(n as keyof LabSettingsForm, e), { prefix: '/settings', fields });
      setMessage({ tone: 'error', text: rest.length ? rest.join(' ') : 'Correct the marked fields.' });
    }
  });

  return (
    <FormProvider {...form}>
      <FieldRow>
        <TextField name="timeZone" label="Lab time zone" testID="setting-time-zone" hint="IANA name, e.g. Europe/Oslo or America/Chicago: weeks and printed times follow it." />
        <NumberField name="signatureTargetHours" label="Signature target" unit="h" testID="setting-signature-target" hint="From the end of the procedure to the signature (1–168 h)." />
      </FieldRow>
      <TextField name="ehrBaseUrl" label="EHR endpoint (FHIR base URL)" testID="setting-ehr-url" hint={`Empty: the server's configured endpoint, ${view.configured.ehrBaseUrl}. Used from the next delivery or retry.`} />
      <TextField name="mailFrom" label="Mail sender" testID="setting-mail-from" keyboard="email" hint={`Empty: the configured sender, ${view.configured.mailFrom}.`} />
      <Text variant="caption" tone="muted" testID="lab-settings-updated">
        {view.updatedAt ? `Last changed ${formatDateTime(view.updatedAt)}${view.updatedBy ? ` by ${view.updatedBy}` : ''}.` : 'Never changed: the defaults apply.'}
      </Text>
      <View style={styles.actions}>
        <Button testID="lab-settings-save" label={save.isPending ? 'Saving…' : 'Save settings'} disabled={save.isPending} onPress={() => void submit()} />
        <Button testID="lab-settings-reset" kind="secondary" label="Undo changes" disabled={save.isPending} onPress={() => form.reset(formOf(view))} />
      </View>
      {message ? (
        <View role={message.tone === 'error' ? 'alert' : 'status'} style={styles.actions} testID={message.tone === 'error' ? 'lab-settings-save-error' : 'lab-settings-saved'}>
          <Text tone={message.tone === 'error' ? 'abnormal' : 'ink'} weight="medium">
            {message.tone === 'error' ? '▲ ' : '✓ '}
            {message.text}
          </Text>
          {message.stale ? <Button testID="lab-settings-reload" kind="secondary" label="Load the saved settings" onPress={onReload} /> : null}
        </View>
      ) : null}
    </FormProvider>
  );
}

const styles = StyleSheet.create({
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
});
