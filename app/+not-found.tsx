import { StyleSheet, View } from 'react-native';
import { Link, Stack } from 'expo-router';
import { Center, Content, Screen } from '../components/ui/layout';
import { Text } from '../components/ui/text';
import { color, space } from '../components/theme';

export default function NotFoundPage() {
  return (
    <Screen testID="not-found-page">
      <Stack.Screen options={{ title: 'Page not found' }} />
      <Content>
        <Center style={styles.center}>
          <Text variant="headline" weight="bold" role="heading" aria-level={1}>
            This page does not exist
          </Text>
          <Text tone="muted">The address may be mistyped, or the page may have moved.</Text>
          <View style={styles.link}>
            <Link href="/" style={styles.linkText} testID="not-found-home-link">
              Go to Isobar
            </Link>
          </View>
        </Center>
      </Content>
    </Screen>
  );
}

const styles = StyleSheet.create({
  center: { gap: space.md, paddingTop: space.xxxl, maxWidth: 560 },
  link: { marginTop: space.md, minHeight: 44, justifyContent: 'center' },
  linkText: { color: color.brand, fontFamily: 'PublicSans_600SemiBold', fontSize: 16, textDecorationLine: 'underline' },
});
