import { StyleSheet, View } from 'react-native';
import { Center, Content } from '../ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../ui/async-states';
import { Button } from '../ui/button';
import { PageHeader } from '../page-header';
import { Text } from '../ui/text';
import { formatDateTime } from '../format';
import { color, radius, space } from '../theme';
import { DeliveryStatusChip } from '../delivery/delivery-status';
import { useDeliveriesNeedingAttentionQuery, useResendDelivery } from '../data/delivery-query';
import { useMeQuery } from '../data/me-query';
import { can } from '../../shared/auth/permissions';

/**
 * Reports the EHR has not received: retrying, refused, or given up. By accession number, status and
 * the EHR's issue codes only, with "Send again".
 */
export default function DeliveriesPage() {
  const me = useMeQuery();
  const allowed = can(me.data?.role, 'delivery:manage');
  const deliveries = useDeliveriesNeedingAttentionQuery(undefined, allowed);
  const resend = useResendDelivery();
  return (
    <Content>
      <Center style={{ gap: 24 }}>
        <PageHeader title="EHR delivery" subtitle="Signed reports the EHR has not received yet: retrying, refused or given up. Sending again is safe; the EHR recognises a resend." />
        {me.data && !allowed ? (
          <EmptyState title="Your role does not include EHR delivery" detail="The department chief and the administrators see this list." testID="deliveries-not-allowed" />
        ) : deliveries.isPending ? (
          <LoadingState label="Loading deliveries…" />
        ) : deliveries.isError ? (
          <ErrorState title="Deliveries could not be loaded" detail={deliveries.error.message} onRetry={() => deliveries.refetch()} />
        ) : deliveries.data.items.length === 0 ? (
          <EmptyState title="Every signed report has reached the EHR" testID="deliveries-empty" />
        ) : (
          <View style={styles.list} role="list" testID="delivery-list">
            {deliveries.data.items.map((d, i) => (
              <View key={d.reportVersionId} role="listitem" style={[styles.row, i > 0 && styles.divider]} testID={`delivery-${d.accession}-v${d.versionNo}`}>
                <View style={styles.grow}>
                  <Text weight="semibold">
                    {d.accession} · version {d.versionNo}
                  </Text>
                  <Text variant="caption" tone="muted">
                    {d.lastError ?? ''} · {d.attempts} {d.attempts === 1 ? 'try' : 'tries'}
                    {d.status === 'failed-retrying' && d.nextAttemptAt ? ` · next ${formatDateTime(d.nextAttemptAt)}` : ''}
                    {d.stoppedAt ? ` · stopped ${formatDateTime(d.stoppedAt)}` : ''}
                  </Text>
                  {d.issues.map((issue, k) => (
                    <Text key={k} variant="caption" tone="muted">
                      {issue.severity} · {issue.code}
                      {issue.expression?.length ? ` · ${issue.expression.join(', ')}` : ''}
                    </Text>
                  ))}
                </View>
                <DeliveryStatusChip status={d.status} />
                <Button
                  kind="secondary"
                  label="Send again"
                  accessibilityLabel={`Send ${d.accession} version ${d.versionNo} to the EHR again`}
                  testID={`delivery-${d.accession}-v${d.versionNo}-resend`}
                  disabled={resend.isPending}
                  onPress={() => resend.mutate(d.reportVersionId)}
                />
              </View>
            ))}
          </View>
        )}
        {resend.isError && (
          <Text variant="caption" tone="abnormal" testID="deliveries-resend-error">
            {resend.error.message}
          </Text>
        )}
      </Center>
    </Content>
  );
}

const styles = StyleSheet.create({
  list: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line },
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', columnGap: space.lg, rowGap: space.xs, paddingHorizontal: space.lg, paddingVertical: space.md },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  grow: { flexGrow: 1, flexBasis: 240, gap: space.xxs },
});
