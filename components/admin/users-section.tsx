import { StyleSheet, View } from 'react-native';
import { isRole, roleLabel } from '../../shared/auth/permissions';
import { useRoleMappingQuery } from '../data/admin-query';
import { useUsersQuery } from '../data/users-query';
import { formatDateTime } from '../format';
import { SectionCard } from '../study/section-card';
import { EmptyState, ErrorState, LoadingState } from '../ui/async-states';
import { Text } from '../ui/text';
import { color, radius, space } from '../theme';

/** Users seen so far with their roles, and the identity provider's claim → role table in force (read only). */
export function UsersSection() {
  const users = useUsersQuery();
  const mapping = useRoleMappingQuery();
  return (
    <SectionCard title="Users and roles" testID="admin-users">
      <Text tone="muted">Roles come from the hospital's identity provider. This table is set in the server's configuration (ROLE_CLAIM, ROLE_MAP) and shown here read only.</Text>
      {mapping.isPending ? (
        <LoadingState label="Loading the role mapping…" testID="role-mapping-loading" />
      ) : mapping.isError ? (
        <ErrorState title="The role mapping could not be loaded" detail={mapping.error.message} onRetry={() => void mapping.refetch()} testID="role-mapping-error" />
      ) : (
        <View style={styles.mapping} testID="role-mapping">
          <Text weight="semibold">
            Groups read from the “{mapping.data.claim}” claim{mapping.data.isDefault ? ' (the built-in example table)' : ''}; the first match wins:
          </Text>
          {mapping.data.rules.length === 0 ? (
            <Text tone="abnormal">No groups are mapped: nobody gets a role.</Text>
          ) : (
            mapping.data.rules.map((r, i) => (
              <View key={r.group} style={styles.rule} testID={`role-rule-${r.role}`}>
                <Text variant="caption" tone="faint" style={styles.rank}>
                  {i + 1}.
                </Text>
                <Text variant="caption" weight="medium" style={styles.group}>
                  {r.group}
                </Text>
                <Text variant="caption">→ {r.roleLabel}</Text>
              </View>
            ))
          )}
          <Text variant="caption" tone="muted">
            Anyone in none of these groups signs in without a role and sees only the no-access page.
          </Text>
        </View>
      )}
      {users.isPending ? (
        <LoadingState label="Loading users…" />
      ) : users.isError ? (
        <ErrorState title="Users could not be loaded" detail={users.error.message} onRetry={() => users.refetch()} />
      ) : users.data.items.length === 0 ? (
        <EmptyState title="No users yet" detail="People appear here after their first sign-in." />
      ) : (
        <View style={styles.list} role="list" testID="user-list">
          {users.data.items.map((u, i) => (
            <View key={u.id} role="listitem" style={[styles.row, i > 0 && styles.divider]}>
              <View style={styles.grow}>
                <Text weight="semibold">{u.displayName}</Text>
                <Text variant="caption" tone="muted">
                  {u.email}
                </Text>
              </View>
              <View style={styles.grow}>
                <Text variant="caption" weight="semibold">
                  {isRole(u.role) ? roleLabel[u.role] : 'No role'}
                </Text>
                <Text variant="caption" tone="muted">
                  Last sign-in {u.lastSignInAt ? formatDateTime(u.lastSignInAt) : 'never'}
                </Text>
              </View>
            </View>
          ))}
        </View>
      )}
    </SectionCard>
  );
}

const styles = StyleSheet.create({
  mapping: { gap: space.xs, backgroundColor: color.surfaceSunken, borderRadius: radius.md, padding: space.md },
  rule: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'baseline' },
  rank: { width: 20 },
  group: { fontFamily: 'monospace' },
  list: { borderRadius: radius.md, borderWidth: 1, borderColor: color.line },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, padding: space.md },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  grow: { flexGrow: 1, flexBasis: 220, gap: space.xxs },
});
