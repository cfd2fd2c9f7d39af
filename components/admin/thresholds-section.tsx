import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { FormProvider, useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import type { ThresholdKey, Thresholds } from '../../shared/physiology';
import { thresholdKeys, thresholdValuesSchema, type ThresholdRow, type ThresholdSetSummary } from '../../shared/settings/threshold-ranges';
import { useCreateThresholdSet, useThresholdOverviewQuery } from '../data/admin-query';
import { NumberField, TextField } from '../form/fields';
import { formatDateTime } from '../format';
import { SectionCard } from '../study/section-card';
import { ErrorState, LoadingState } from '../ui/async-states';
import { Button } from '../ui/button';
import { Text } from '../ui/text';
import { color, radius, space } from '../theme';
import { applyFieldErrors } from '../form/apply-field-errors';

const formSchema = z.object({
  values: thresholdValuesSchema.required(),
  effectiveFrom: z
    .string()
    .trim()
    .regex(/^\d{4}-\d{2}-\d{2}$/, { error: 'Effective date must be a date as YYYY-MM-DD (today or later), or empty for now.' })
    .nullable(),
  note: z.string().trim().max(500, { error: 'The note is too long (at most 500 characters).' }).nullable(),
});
type FormValues = z.infer<typeof formSchema>;

const decimalsOf = (step: number) => (Number.isInteger(step) ? 0 : String(step).split('.')[1].length);
const fmt = (n: number, step: number) => n.toFixed(decimalsOf(step));
const valuesOf = (rows: ThresholdRow[]) => Object.fromEntries(rows.map((r) => [r.key, r.value])) as unknown as Thresholds;

/** Every cut-off with its source, the value in force and its allowed range; a new set with its effective date. */
export function ThresholdsSection() {
  const overview = useThresholdOverviewQuery();
  return (
    <SectionCard title="Thresholds" testID="admin-thresholds">
      <Text tone="muted">
        The cut-offs that judge each study. A new set applies to studies signed from its effective date; a signed report keeps the thresholds it was judged by, and an addendum keeps them unless the
        physician chooses the ones then in force. Dates in the past are refused.
      </Text>
      {overview.isPending ? (
        <LoadingState label="Loading thresholds…" testID="thresholds-loading" />
      ) : overview.isError ? (
        <ErrorState title="Thresholds could not be loaded" detail={overview.error.message} onRetry={() => void overview.refetch()} testID="thresholds-error" />
      ) : (
        <ThresholdsForm rows={overview.data.rows} inForce={overview.data.inForce} scheduled={overview.data.scheduled} history={overview.data.history} />
      )}
    </SectionCard>
  );
}

function ThresholdsForm({ rows, inForce, scheduled, history }: { rows: ThresholdRow[]; inForce: { setId: number | null; effectiveFrom: string | null }; scheduled: ThresholdSetSummary[]; history: ThresholdSetSummary[] }) {
  const inForceValues = useMemo(() => valuesOf(rows), [rows]);
  const form = useForm<FormValues>({ resolver: zodResolver(formSchema), defaultValues: { values: inForceValues, effectiveFrom: null, note: null }, mode: 'onBlur' });
  const create = useCreateThresholdSet();
  const [summary, setSummary] = useState<{ tone: 'ok' | 'error'; lines: string[] } | null>(null);
  useEffect(() => form.reset({ values: inForceValues, effectiveFrom: null, note: null }), [inForceValues, form]);

  const submit = form.handleSubmit(
    async (v) => {
    setSummary(null);
    const changed = Object.fromEntries(thresholdKeys.filter((k) => v.values[k] !== inForceValues[k]).map((k) => [k, v.values[k]])) as Partial<Thresholds>;
    if (Object.keys(changed).length === 0) return setSummary({ tone: 'error', lines: ['Change at least one threshold before saving a new set.'] });
    try {
      const res = await create.mutateAsync({ values: changed, ...(v.effectiveFrom ? { effectiveFrom: v.effectiveFrom } : {}), note: v.note });
      const when = formatDateTime(res.set.effectiveFrom);
      setSummary({ tone: 'ok', lines: [`Saved: ${Object.keys(changed).length} change${Object.keys(changed).length === 1 ? '' : 's'}, in force from ${when} for studies signed from then on.`] });
    } catch (error) {
      const rest = applyFieldErrors(error, (n, e) => form.setError(n as never, e), { prefix: '/values', fields: thresholdKeys, formPrefix: 'values.' });
      const other = rest.filter(Boolean);
      if (error && typeof error === 'object' && 'problem' in error) {
        const ef = (error as { problem: { errors?: { pointer: string; detail: string }[] } }).problem.errors?.find((e) => e.pointer === '/effectiveFrom');
        if (ef) form.setError('effectiveFrom', { type: 'server', message: ef.detail });
      }
      setSummary({ tone: 'error', lines: other.length ? other : ['Correct the marked fields.'] });
    }
    },
    (errors) => {
      const labels = thresholdKeys.filter((k) => errors.values?.[k]).map((k) => rows.find((r) => r.key === k)?.label ?? k);
      setSummary({ tone: 'error', lines: [labels.length ? `Correct the marked field${labels.length === 1 ? '' : 's'}: ${labels.join(', ')}.` : 'Correct the marked fields.'] });
    },
  );

  return (
    <FormProvider {...form}>
      <Text weight="semibold" testID="thresholds-in-force">
        {inForce.setId === null ? 'In force: the published defaults.' : `In force since ${formatDateTime(inForce.effectiveFrom!)} (set ${inForce.setId}).`}
      </Text>
      {scheduled.length ? (
        <View style={styles.notice} testID="thresholds-scheduled">
          {scheduled.map((s) => (
            <Text key={s.id} variant="caption">
              Scheduled: set {s.id} from {formatDateTime(s.effectiveFrom)} — {describeOverrides(s.overrides, rows)}
            </Text>
          ))}
        </View>
      ) : null}
      <View role="list" style={styles.table}>
        {rows.map((r, i) => (
          <View key={r.key} role="listitem" style={[styles.row, i > 0 && styles.divider]} testID={`threshold-row-${r.key}`}>
            <View style={styles.about}>
              <Text weight="semibold">{r.label}</Text>
              <Text variant="caption" tone={r.source === 'lab setting' ? 'brand' : 'muted'} testID={`threshold-source-${r.key}`}>
                {r.source === 'lab setting' ? `Lab setting (published default ${fmt(r.defaultValue, r.range.step)}: ${readable(r.defaultSource)})` : `Source: ${readable(r.source)}`}
              </Text>
              <Text variant="caption" tone="faint">
                Allowed {fmt(r.range.min, r.range.step)}–{fmt(r.range.max, r.range.step)} ({readable(r.range.basis)})
              </Text>
            </View>
            <View style={styles.input}>
              <NumberField name={`values.${r.key}`} label={`${r.label} ${r.unit.startsWith('(') ? '' : r.unit}`.trim()} unit={r.unit.startsWith('(') ? undefined : r.unit} testID={`threshold-${r.key}`} decimals={decimalsOf(r.range.step)} integer={r.range.step === 1} />
            </View>
          </View>
        ))}
      </View>
      <View style={styles.footer}>
        <View style={styles.grow}>
          <TextField name="effectiveFrom" label="Effective from" testID="threshold-effective-from" hint="YYYY-MM-DD, today or later; empty means now." />
        </View>
        <View style={styles.grow}>
          <TextField name="note" label="Note (why)" testID="threshold-note" />
        </View>
      </View>
      <View style={styles.actions}>
        <Button testID="threshold-save" label={create.isPending ? 'Saving…' : 'Save as a new set'} disabled={create.isPending} onPress={() => void submit()} />
        <Button testID="threshold-reset" kind="secondary" label="Undo changes" disabled={create.isPending} onPress={() => form.reset({ values: inForceValues, effectiveFrom: null, note: null })} />
      </View>
      {summary ? (
        <View role={summary.tone === 'error' ? 'alert' : 'status'} testID={summary.tone === 'error' ? 'threshold-save-error' : 'threshold-saved'}>
          {summary.lines.map((l) => (
            <Text key={l} tone={summary.tone === 'error' ? 'abnormal' : 'ink'} weight="medium">
              {summary.tone === 'error' ? '▲ ' : '✓ '}
              {l}
            </Text>
          ))}
        </View>
      ) : null}
      {history.length ? (
        <View style={styles.history} testID="thresholds-history">
          <Text weight="semibold">Earlier and scheduled sets</Text>
          {history.slice(0, 8).map((s) => (
            <Text key={s.id} variant="caption" tone="muted">
              Set {s.id}: from {formatDateTime(s.effectiveFrom)}
              {s.createdBy ? ` · by ${s.createdBy}` : ''} · {describeOverrides(s.overrides, rows)}
              {s.note ? ` · “${s.note}”` : ''}
            </Text>
          ))}
        </View>
      ) : null}
    </FormProvider>
  );
}

/** Source notes in words: "[practice]" is common practice, "[memory]" a value recalled rather than looked up. */
const readable = (s: string) => s.replace(/\[practice\]/g, 'common practice:').replace(/\[memory(: ([^\]]+))?\]/g, (_m, _g, what) => (what ? `from memory (${what})` : 'from memory')).replace(/:\s*;/g, ';').replace(/:\s*$/, '');

function describeOverrides(overrides: Partial<Record<ThresholdKey, number>>, rows: ThresholdRow[]): string {
  const keys = Object.keys(overrides) as ThresholdKey[];
  if (!keys.length) return 'the published defaults';
  return keys.map((k) => `${rows.find((r) => r.key === k)?.label ?? k} ${overrides[k]}`).join(', ');
}

const styles = StyleSheet.create({
  table: { borderRadius: radius.md, borderWidth: 1, borderColor: color.line },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, padding: space.md, alignItems: 'flex-start' },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  about: { flexGrow: 3, flexBasis: 260, gap: space.xxs, minWidth: 0 },
  input: { flexGrow: 1, flexBasis: 160, maxWidth: 280, minWidth: 0 },
  footer: { flexDirection: 'row', flexWrap: 'wrap', gap: space.lg },
  grow: { flexGrow: 1, flexBasis: 220, minWidth: 0 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  notice: { backgroundColor: color.accentSoft, borderRadius: radius.md, padding: space.md, gap: space.xs },
  history: { gap: space.xs },
});
