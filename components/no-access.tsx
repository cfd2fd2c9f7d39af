import { StyleSheet, View } from 'react-native';
import { BrandMark } from './brand-mark';
import { Button } from './ui/button';
import { Center, Content, Screen } from './ui/layout';
import { Text } from './ui/text';
import { color, radius, space } from './theme';
import type { Me } from '../shared/auth/users';
import { useSignOut } from './data/me-query';

/** A signed-in person whose account carries no Isobar role: say so plainly and say what to do. */
export function NoAccess({ me }: { me: Me }) {
  const signOut = useSignOut();
  return (
    <Screen testID="no-access-page">
      <Content>
        <Center style={styles.center}>
          <BrandMark size={40} />
          <Text variant="headline" weight="bold" role="heading" aria-level={1}>
            No access to Isobar yet
          </Text>
          <View style={styles.card}>
            <Text>
              You are signed in as <Text weight="semibold">{me.displayName}</Text> ({me.email}), but your hospital account has no
              Isobar role, so there is nothing here you can open.
            </Text>
            <Text tone="muted">
              Ask the lab's Isobar administrator to add you to the right group (lab staff, physicians, coding, department chief or
              administrators). Sign in again once it is done.
            </Text>
          </View>
          <Button testID="no-access-sign-out" label={signOut.isPending ? 'Signing out…' : 'Sign out'} kind="secondary" onPress={() => signOut.mutate()} />
        </Center>
      </Content>
    </Screen>
  );
}

const styles = StyleSheet.create({
  center: { gap: space.lg, maxWidth: 560, paddingTop: space.xxxl },
  card: { gap: space.md, backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, padding: space.xl },
});
