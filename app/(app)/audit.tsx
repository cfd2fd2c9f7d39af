import { StyleSheet, View } from 'react-native';
import { Center, Content } from '../../components/ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../../components/ui/async-states';
import { PageHeader } from '../../components/page-header';
import { Text } from '../../components/ui/text';
import { formatDateTime } from '../../components/format';
import { color, radius, space } from '../../components/theme';
import { useAuditEventsQuery } from '../../components/data/records-query';

/** The newest audit events (the server exports them as FHIR AuditEvent resources). */
export default function AuditPage() {
  const audit = useAuditEventsQuery();
  const events = audit.data?.entry?.map((e) => e.resource) ?? [];
  return (
    <Content>
      <Center style={{ gap: 24 }}>
        <PageHeader title="Audit trail" subtitle="Sign-ins, reads and changes, newest first. The trail cannot be edited or deleted." />
        {audit.isPending ? (
          <LoadingState label="Loading the audit trail…" />
        ) : audit.isError ? (
          <ErrorState title="The audit trail could not be loaded" detail={audit.error.message} onRetry={() => audit.refetch()} />
        ) : events.length === 0 ? (
          <EmptyState title="No events recorded yet" />
        ) : (
          <View style={styles.list} role="list" testID="audit-list">
            {events.map((e, i) => {
              const agent = e.agent[0];
              const failed = e.outcome !== '0';
              return (
                <View key={e.id} role="listitem" style={[styles.row, i > 0 && styles.divider]}>
                  <Text variant="caption" tone="muted" style={styles.time}>
                    {formatDateTime(e.recorded)}
                  </Text>
                  <Text variant="caption" weight="semibold" style={styles.grow} tone={failed ? 'abnormal' : 'ink'}>
                    {failed ? '▲ ' : ''}
                    {e.outcomeDesc ?? e.type.display}
                  </Text>
                  <Text variant="caption" style={styles.grow}>
                    {agent?.who?.display ?? 'unknown'}
                    {agent?.role?.[0]?.text ? ` (${agent.role[0].text})` : ''}
                  </Text>
                  <Text variant="caption" tone="muted" style={styles.grow}>
                    {e.entity?.[0]?.what?.display ?? ''} {e.entity?.[0]?.what?.identifier?.value?.slice(0, 8) ?? ''}
                    {agent?.network?.address ? ` · ${agent.network.address}` : ''}
                  </Text>
                </View>
              );
            })}
          </View>
        )}
      </Center>
    </Content>
  );
}

const styles = StyleSheet.create({
  list: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line },
  row: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.lg, rowGap: space.xxs, paddingHorizontal: space.lg, paddingVertical: space.md },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  time: { width: 150 },
  grow: { flexGrow: 1, flexBasis: 160 },
});
