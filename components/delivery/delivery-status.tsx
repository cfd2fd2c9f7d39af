import { StyleSheet, View } from 'react-native';
import { can, type Role } from '../../shared/auth/permissions';
import { deliveryStatusLabel, type DeliveryStatus, type StudyDelivery } from '../../shared/delivery/status';
import { useResendDelivery, useStudyDeliveriesQuery } from '../data/delivery-query';
import { formatDateTime } from '../format';
import { color, radius, space } from '../theme';
import { ErrorState, LoadingState } from '../ui/async-states';
import { Button } from '../ui/button';
import { Text } from '../ui/text';

const chipColours: Record<DeliveryStatus, { bg: string; fg: string }> = {
  queued: { bg: color.surfaceSunken, fg: color.inkMuted },
  sending: { bg: color.brandSoft, fg: color.brand },
  delivered: { bg: color.normalSoft, fg: color.normal },
  'failed-retrying': { bg: color.borderlineSoft, fg: color.borderline },
  rejected: { bg: color.abnormalSoft, fg: color.abnormal },
  'given-up': { bg: color.abnormalSoft, fg: color.abnormal },
};

export function DeliveryStatusChip({ status, testID }: { status: DeliveryStatus; testID?: string }) {
  const c = chipColours[status];
  return (
    <View style={[styles.chip, { backgroundColor: c.bg }]} testID={testID}>
      <Text variant="caption" weight="semibold" style={{ color: c.fg }}>
        {deliveryStatusLabel[status]}
      </Text>
    </View>
  );
}

/** What happened to one version, in a sentence. */
function summary(d: StudyDelivery): string {
  switch (d.status) {
    case 'queued':
      return `Queued ${formatDateTime(d.queuedAt)}.`;
    case 'sending':
      return `Being sent (try ${d.attempts}).`;
    case 'delivered':
      return `Received by the EHR ${formatDateTime(d.deliveredAt)}${d.ehrReportId ? ` as ${d.ehrReportId}` : ''}.`;
    case 'failed-retrying':
      return `${d.lastError ?? 'Not sent'} (try ${d.attempts}). Next try ${formatDateTime(d.nextAttemptAt)}.`;
    case 'rejected':
      return `The EHR refused the report${d.httpStatus ? ` (${d.httpStatus})` : ''}: ${d.lastError ?? ''}`;
    case 'given-up':
      return `Not delivered: ${d.lastError ?? 'gave up'}.`;
  }
}

/**
 * The EHR delivery of each signed version of a study, for the study page: status, the EHR's report id,
 * the next try, the EHR's issues. The chief and the administrator can send a version again.
 */
export function DeliveryStatusPanel({ studyId, role }: { studyId: string; role: Role | null }) {
  const deliveries = useStudyDeliveriesQuery(studyId);
  const resend = useResendDelivery();
  const mayResend = can(role, 'delivery:manage');
  if (deliveries.isPending) return <LoadingState label="Loading EHR delivery…" testID="delivery-loading" />;
  if (deliveries.isError) return <ErrorState title="EHR delivery could not be loaded" detail={deliveries.error.message} onRetry={() => deliveries.refetch()} testID="delivery-error" />;
  const items = deliveries.data.items;
  return (
    <View style={styles.panel} testID="delivery-panel" accessibilityLabel="Delivery to the EHR">
      <Text weight="semibold">Delivery to the EHR</Text>
      {items.length === 0 ? (
        <Text variant="caption" tone="muted" testID="delivery-none">
          Nothing signed yet: the report is sent when it is signed.
        </Text>
      ) : (
        items.map((d) => (
          <View key={d.reportVersionId} style={styles.row} testID={`delivery-v${d.versionNo}`}>
            <View style={styles.head}>
              <Text variant="caption" weight="semibold">
                Version {d.versionNo}
                {d.reportStatus === 'amended' ? ' (addendum)' : ''}
              </Text>
              <DeliveryStatusChip status={d.status} testID={`delivery-v${d.versionNo}-status`} />
            </View>
            <Text variant="caption" tone="muted">
              {summary(d)}
            </Text>
            {d.issues.length > 0 && (
              <View role="list" accessibilityLabel="Issues the EHR reported">
                {d.issues.map((issue, i) => (
                  <Text key={i} role="listitem" variant="caption" tone={issue.severity === 'error' || issue.severity === 'fatal' ? 'abnormal' : 'muted'}>
                    {issue.severity} · {issue.code}
                    {issue.expression?.length ? ` · ${issue.expression.join(', ')}` : ''}
                    {issue.diagnostics ? ` — ${issue.diagnostics}` : ''}
                  </Text>
                ))}
              </View>
            )}
            {mayResend && d.status !== 'sending' && d.status !== 'queued' && (
              <Button
                kind="secondary"
                label="Send again"
                accessibilityLabel={`Send version ${d.versionNo} to the EHR again`}
                testID={`delivery-v${d.versionNo}-resend`}
                disabled={resend.isPending}
                onPress={() => resend.mutate(d.reportVersionId)}
                style={styles.button}
              />
            )}
          </View>
        ))
      )}
      {resend.isError && (
        <Text variant="caption" tone="abnormal" testID="delivery-resend-error">
          {resend.error.message}
        </Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  panel: { gap: space.sm, backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, padding: space.lg },
  row: { gap: space.xxs, paddingTop: space.sm, borderTopWidth: 1, borderTopColor: color.line },
  head: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm },
  chip: { borderRadius: radius.pill, paddingHorizontal: space.sm, paddingVertical: 2 },
  button: { alignSelf: 'flex-start', marginTop: space.xs },
});
