import { useState } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import { Link, useLocalSearchParams } from 'expo-router';
import { useReportAction, useReportPreview } from '../../data/report-query';
import { problemSlugOf } from '../../../shared/http/problem';
import type { ThresholdsChoice } from '../../../shared/report/thresholds-basis';
import { missingSummary } from '../../../shared/report/completeness';
import { RadioChips } from '../../ui/radio-chips';
import { ApiError } from '../../data/api';
import { SectionCard } from '../../study/section-card';
import { Button } from '../../ui/button';
import { ErrorState, LoadingState } from '../../ui/async-states';
import { Text } from '../../ui/text';
import { CautionNote } from '../../caution-note';
import { ReportDocumentView } from '../../report/report-document';
import { DeliveryStatusPanel } from '../../delivery/delivery-status';
import { useMeQuery } from '../../data/me-query';
import { color, font, radius, space, type } from '../../theme';
import { transitions, type StudyAction } from '../../../shared/study/state-machine';
import { studyStateLabel, type StudyState } from '../../../shared/study/vocabulary';

/** Report: the preview as it would be signed, what is missing, the hand-off and the signature. */
export default function ReportSection() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const [thresholdsChoice, setThresholdsChoice] = useState<ThresholdsChoice>('original');
  const preview = useReportPreview(id, thresholdsChoice);
  const act = useReportAction(id);
  const me = useMeQuery();
  const [reason, setReason] = useState('');
  if (preview.isPending) return <LoadingState label="Building the report preview…" testID="report-loading" />;
  if (preview.isError) return <ErrorState title="The report preview could not be built" detail={preview.error.message} onRetry={() => void preview.refetch()} testID="report-error" />;
  const p = preview.data;
  const needsReason = (a: StudyAction) => transitions[a].needsReason || (a === 'sign' && p.state === 'amending');
  const signAction: StudyAction = p.state === 'amending' ? 'sign-addendum' : 'sign';
  const actions = p.actions.filter((a) => a !== 'sign-addendum' || p.state === 'amending');
  const blocked = (a: StudyAction) => (a === 'sign' || a === 'sign-addendum') && !p.completeness.complete;
  const error = act.error instanceof ApiError ? act.error : null;
  return (
    <>
      <SectionCard title="Report" testID="card-report">
        <Text testID="report-state">State: {studyStateLabel[p.state as StudyState] ?? p.state}</Text>
        {p.completeness.complete ? (
          <Text weight="semibold" testID="report-complete">
            ✓ Complete: nothing is missing before signing.
          </Text>
        ) : (
          <View style={styles.missing} role="alert" testID="report-missing">
            <Text weight="semibold" tone="abnormal">
              {missingSummary(p.completeness)}
            </Text>
            {p.completeness.missing.map((m) => (
              <Link key={m.path} href={`/studies/${id}/${m.section === 'details' || m.section === 'patient' ? '' : m.section === 'vessels' ? 'vessels' : m.section}` as '/'}>
                <Text variant="caption" tone="abnormal" testID={`report-missing-${m.code}`}>
                  ▲ {m.message}
                </Text>
              </Link>
            ))}
          </View>
        )}
        {p.writtenValues?.length ? (
          <View style={styles.check} role="alert" testID="report-written-values">
            <Text weight="semibold">
              {p.writtenValues.length === 1 ? '1 value' : `${p.writtenValues.length} values`} to check in the impression and plan
            </Text>
            {p.writtenValues.map((w, i) => (
              <Link key={`${w.field}-${i}`} href={`/studies/${id}/findings` as '/'}>
                <Text variant="caption" testID={`report-written-value-${i}`}>
                  ▲ {w.message}
                </Text>
              </Link>
            ))}
          </View>
        ) : null}
        {p.state === 'amending' && p.thresholds?.choice && p.thresholds.choice.differences.length > 0 ? (
          <View style={styles.choice} testID="report-thresholds-choice">
            <Text weight="semibold" nativeID="report-thresholds-label">
              Thresholds for this addendum
            </Text>
            <Text variant="caption" tone="muted">
              The lab's thresholds have changed since version {p.thresholds.amendedVersion ?? 1} was signed:{' '}
              {p.thresholds.choice.differences.map((d) => `${d.label} ${d.original} then, ${d.current} now`).join('; ')}. The addendum keeps the original's unless you choose those in force now; your
              choice is recorded.
            </Text>
            <RadioChips
              testID="report-thresholds"
              labelledBy="report-thresholds-label"
              options={[
                { value: 'original' as ThresholdsChoice, label: `Keep version ${p.thresholds.amendedVersion ?? 1}'s` },
                { value: 'current' as ThresholdsChoice, label: 'Use those in force now' },
              ]}
              value={thresholdsChoice}
              onChange={setThresholdsChoice}
            />
          </View>
        ) : null}
        {actions.some(needsReason) ? (
          <TextInput
            testID="report-reason"
            accessibilityLabel="Reason (needed to send back or to sign an addendum)"
            placeholder="Reason, when one is needed"
            value={reason}
            onChangeText={setReason}
            style={styles.reason}
          />
        ) : null}
        <View style={styles.actions}>
          {actions.map((a) => {
            const action = a === 'sign' ? signAction : a;
            return (
              <Button
                key={a}
                testID={`report-action-${a}`}
                label={transitions[action].label}
                kind={a === 'sign' || a === 'sign-addendum' ? 'primary' : 'secondary'}
                disabled={act.isPending || blocked(action)}
                accessibilityLabel={blocked(action) ? `${transitions[action].label}: not possible until the missing items are entered` : undefined}
                onPress={() =>
                  act.mutate({ action, version: p.studyVersion, reason: reason.trim() || undefined, ...(action === 'sign-addendum' ? { thresholds: thresholdsChoice } : {}) })
                }
              />
            );
          })}
        </View>
        {error ? (
          <Text tone="abnormal" role="alert" testID="report-action-error">
            ▲ {error.message}
            {problemSlugOf(error.problem.type) === 'reauthentication-required' ? (
              // A full page load (target _self): the provider confirms who signs, then brings the physician back here.
              <Link href={`/api/auth/sign-in?reauth=1&returnTo=${encodeURIComponent(`/studies/${id}/report`)}` as '/'} target="_self">
                <Text tone="brand"> Sign in again</Text>
              </Link>
            ) : null}
          </Text>
        ) : null}
        <CautionNote testID="report-caution" />
      </SectionCard>
      {p.versions.length ? (
        <SectionCard title="Signed versions" testID="card-versions">
          {p.versions.map((v) => (
            <Text key={v.id} testID={`report-version-${v.versionNo}`}>
              Version {v.versionNo} ({v.status === 'final' ? 'first signature' : 'addendum'}) · {v.signerName} · {new Date(v.signedAt).toLocaleString()} ·{' '}
              <Link href={`/api/reports/${v.id}/pdf` as '/'} target="_blank">
                <Text tone="brand">PDF</Text>
              </Link>{' '}
              · fingerprint {v.contentSha256.slice(0, 16)}
            </Text>
          ))}
        </SectionCard>
      ) : null}
      {p.versions.length ? <DeliveryStatusPanel studyId={id} role={me.data?.role ?? null} /> : null}
      <SectionCard title="Preview" testID="card-preview">
        <Text variant="caption" tone="muted" testID="report-preview-version">
          The report as it would be signed now, from the saved record (version {p.studyVersion}).
        </Text>
        <ReportDocumentView doc={p.document} testID="report-preview-text" />
      </SectionCard>
    </>
  );
}

const styles = StyleSheet.create({
  missing: { gap: space.xs, backgroundColor: color.abnormalSoft, borderRadius: radius.md, padding: space.md },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  choice: { gap: space.xs, backgroundColor: color.accentSoft, borderRadius: radius.md, padding: space.md },
  check: { gap: space.xs, backgroundColor: color.borderlineSoft, borderRadius: radius.md, padding: space.md },
  reason: { borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, padding: space.sm, fontFamily: font.regular, fontSize: type.body.fontSize },
});
