import { StyleSheet, View } from 'react-native';
import { Center, Content } from '../../components/ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../../components/ui/async-states';
import { PageHeader } from '../../components/page-header';
import { Text } from '../../components/ui/text';
import { formatDateTime } from '../../components/format';
import { color, radius, space } from '../../components/theme';
import { isRole, roleLabel } from '../../shared/auth/permissions';
import { useUsersQuery } from '../../components/data/users-query';

/** Users and their roles. Roles come from the identity provider's groups; this page shows the result. */
export default function AdminPage() {
  const users = useUsersQuery();
  return (
    <Content>
      <Center style={{ gap: 24 }}>
        <PageHeader title="Administration" subtitle="Everyone who has signed in or been set up, with the role their hospital groups give them." />
        {users.isPending ? (
          <LoadingState label="Loading users…" />
        ) : users.isError ? (
          <ErrorState title="Users could not be loaded" detail={users.error.message} onRetry={() => users.refetch()} />
        ) : users.data.items.length === 0 ? (
          <EmptyState title="No users yet" />
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
      </Center>
    </Content>
  );
}

const styles = StyleSheet.create({
  list: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, padding: space.lg },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  grow: { flexGrow: 1, flexBasis: 220, gap: space.xxs },
});
