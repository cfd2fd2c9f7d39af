import { useEffect, useState } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import { Link } from 'expo-router';
import { Center, Content } from '../../components/ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../../components/ui/async-states';
import { PageHeader } from '../../components/page-header';
import { Button } from '../../components/ui/button';
import { RadioChips } from '../../components/ui/radio-chips';
import { Text } from '../../components/ui/text';
import { formatDateTime } from '../../components/format';
import { color, font, radius, space, touchTarget, type } from '../../components/theme';
import { useAuditTrail, type AuditFilters } from '../../components/data/audit-query';
import { auditActionLabel, auditActions, type AuditActionCode } from '../../shared/audit/trail';
import { roleLabel, isRole } from '../../shared/auth/permissions';

const isDay = (v: string) => /^\d{4}-\d{2}-\d{2}$/.test(v);

/** The audit trail, newest first: who did what to which patient's study, when and from where. */
export default function AuditPage() {
  const [text, setText] = useState({ user: '', patient: '', from: '', to: '' });
  const [action, setAction] = useState<AuditActionCode | ''>('');
  const [filters, setFilters] = useState<AuditFilters>({});
  // Typed filters apply after a short pause; a date applies once it is a whole date.
  useEffect(() => {
    const t = setTimeout(
      () =>
        setFilters({
          user: text.user.trim() || undefined,
          patient: text.patient.trim() || undefined,
          from: isDay(text.from) ? text.from : undefined,
          to: isDay(text.to) ? text.to : undefined,
          action: action || undefined,
        }),
      300,
    );
    return () => clearTimeout(t);
  }, [text, action]);
  const audit = useAuditTrail(filters);
  const events = audit.data?.pages.flatMap((p) => p.items) ?? [];
  const filtered = Object.values(filters).some(Boolean);
  const field = (key: keyof typeof text, label: string, placeholder: string) => (
    <View style={styles.filter}>
      <Text variant="caption" weight="semibold" tone="muted" nativeID={`audit-filter-${key}-label`}>
        {label}
      </Text>
      <TextInput
        testID={`audit-filter-${key}`}
        aria-labelledby={`audit-filter-${key}-label`}
        placeholder={placeholder}
        placeholderTextColor={color.inkFaint}
        value={text[key]}
        onChangeText={(v) => setText({ ...text, [key]: v })}
        style={styles.input}
        autoCapitalize="none"
      />
    </View>
  );
  return (
    <Content>
      <Center style={{ gap: space.xl }}>
        <PageHeader title="Audit trail" subtitle="Sign-ins, reads and changes, newest first. The trail cannot be edited or deleted." />
        <View style={styles.filters}>
          {field('user', 'User', 'Name or part of it')}
          {field('patient', 'Patient', 'MRN or family name')}
          {field('from', 'From', 'YYYY-MM-DD')}
          {field('to', 'To', 'YYYY-MM-DD')}
        </View>
        <View style={styles.actionRow}>
          <Text variant="caption" weight="semibold" tone="muted" nativeID="audit-filter-action-label">
            Action
          </Text>
          <RadioChips
            pill
            testID="audit-filter-action"
            labelledBy="audit-filter-action-label"
            options={[{ value: '' as const, label: 'Any', quiet: true }, ...auditActions.map((a) => ({ value: a, label: auditActionLabel[a] }))]}
            value={action}
            onChange={setAction}
          />
        </View>
        {audit.isPending ? (
          <LoadingState label="Loading the audit trail…" />
        ) : audit.isError ? (
          <ErrorState title="The audit trail could not be loaded" detail={audit.error.message} onRetry={() => audit.refetch()} />
        ) : events.length === 0 ? (
          <EmptyState title={filtered ? 'No event matches' : 'No events recorded yet'} detail={filtered ? 'Change or clear a filter.' : undefined} />
        ) : (
          <>
            <View style={styles.list} role="list" testID="audit-list">
              {events.map((e, i) => {
                const failed = e.outcome !== 'success';
                return (
                  <View key={e.id} role="listitem" style={[styles.row, i > 0 && styles.divider]} testID={`audit-row-${e.id}`}>
                    <Text variant="caption" tone="muted" style={styles.time}>
                      {formatDateTime(e.recordedAt)}
                    </Text>
                    <Text variant="caption" weight="semibold" style={styles.what} tone={failed ? 'abnormal' : 'ink'}>
                      {failed ? '▲ ' : ''}
                      {e.actionLabel}
                      {e.outcome === 'failure' ? ' (failed)' : ''}
                    </Text>
                    <Text variant="caption" style={styles.grow}>
                      {e.actor ?? 'Not signed in'}
                      {e.actorRole ? ` (${isRole(e.actorRole) ? roleLabel[e.actorRole] : e.actorRole})` : ''}
                    </Text>
                    <View style={styles.grow}>
                      {e.studyId ? (
                        <Link href={`/studies/${e.studyId}`} style={styles.link}>
                          <Text variant="caption" tone="brand" weight="medium">
                            {e.target}
                          </Text>
                        </Link>
                      ) : (
                        <Text variant="caption" tone="muted">
                          {e.target ?? ''}
                        </Text>
                      )}
                      {e.clientAddress ? (
                        <Text variant="caption" tone="faint">
                          from {e.clientAddress}
                        </Text>
                      ) : null}
                    </View>
                  </View>
                );
              })}
            </View>
            {audit.hasNextPage ? (
              <Button testID="audit-more" kind="secondary" label={audit.isFetchingNextPage ? 'Loading…' : 'Show older events'} disabled={audit.isFetchingNextPage} onPress={() => void audit.fetchNextPage()} />
            ) : null}
          </>
        )}
      </Center>
    </Content>
  );
}

const styles = StyleSheet.create({
  filters: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  filter: { gap: space.xxs, flexGrow: 1, flexBasis: 150 },
  input: { minHeight: touchTarget, borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, backgroundColor: color.surface, paddingHorizontal: space.md, fontFamily: font.regular, fontSize: type.body.fontSize, color: color.ink },
  actionRow: { gap: space.xs },
  list: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line },
  row: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.lg, rowGap: space.xxs, paddingHorizontal: space.lg, paddingVertical: space.md },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  time: { width: 150 },
  what: { width: 150 },
  grow: { flexGrow: 1, flexBasis: 160 },
  link: { minHeight: 24 },
});
