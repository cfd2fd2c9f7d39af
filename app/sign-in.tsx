import { StyleSheet, View } from 'react-native';
import { Redirect, useLocalSearchParams } from 'expo-router';
import { BrandMark } from '../components/brand-mark';
import { Button } from '../components/ui/button';
import { Center, Content, Screen, useIsWide } from '../components/ui/layout';
import { Text } from '../components/ui/text';
import { CautionNote } from '../components/caution-note';
import { ServiceStatus } from '../components/service-status';
import { color, radius, space } from '../components/theme';
import { startSignIn, useMeQuery } from '../components/data/me-query';

/** What went wrong, in words, for each reason the server may send back here. */
const signInErrors: Record<string, string> = {
  expired: 'The sign-in took too long or was started in another tab. Please sign in again.',
  failed: 'The hospital sign-in could not be completed. Please try again.',
  'provider-refused': 'The hospital sign-in service declined the request. Please try again.',
  'provider-unavailable': 'The hospital sign-in service is not answering. Try again in a moment, or call the service desk.',
};

const steps = [
  { title: 'Record', body: 'Pressures, transit times and drug doses, entered at the table on a phone or a workstation.' },
  { title: 'Compute', body: 'FFR, resting Pd/Pa, CFR, IMR, RRR and the endotype, with quality checks beside each number.' },
  { title: 'Review', body: 'One worklist for the lab and the physicians, the coding queue for coders, turnaround and the audit trail for the chief.' },
];

/** Signed-out start page: the product, the sign-in button, the service state. */
export default function SignInPage() {
  const wide = useIsWide();
  const params = useLocalSearchParams<{ error?: string; signedOut?: string; returnTo?: string }>();
  const me = useMeQuery();
  if (me.data) {
    return <Redirect href={(params.returnTo?.startsWith('/') && !params.returnTo.startsWith('//') ? params.returnTo : (me.data.home ?? '/')) as '/'} />;
  }
  const message = params.error ? (signInErrors[params.error] ?? signInErrors.failed) : null;
  return (
    <Screen testID="sign-in-page">
      <Content style={styles.content}>
        <Center style={[styles.columns, wide && styles.columnsWide]}>
          <View style={[styles.intro, wide && styles.introWide]}>
            <View style={styles.brandRow}>
              <BrandMark size={wide ? 56 : 44} />
              <Text variant={wide ? 'display' : 'headline'} weight="bold" role="heading" aria-level={1} tone="brand">
                Isobar
              </Text>
            </View>
            <Text variant="lead" tone="muted" style={styles.tagline}>
              Coronary physiology, from the wire to the result.
            </Text>
            <Text tone="muted" style={styles.body}>
              For the catheterization lab team, the reading cardiologist, the coders and the department chief.
            </Text>
            {message ? (
              <View style={styles.alert} role="alert" testID="sign-in-error">
                <Text tone="abnormal" weight="medium">
                  {message}
                </Text>
              </View>
            ) : params.signedOut ? (
              <View style={styles.notice} role="status" testID="signed-out-notice">
                <Text weight="medium">You have signed out.</Text>
              </View>
            ) : null}
            <Button
              testID="sign-in-button"
              label="Sign in"
              accessibilityLabel="Sign in with your hospital account"
              onPress={() => startSignIn(params.returnTo)}
              style={styles.signIn}
            />
            <ServiceStatus />
          </View>
          <View style={[styles.steps, wide && styles.stepsWide]} accessibilityLabel="What Isobar does">
            {steps.map((step, i) => (
              <View key={step.title} style={styles.step}>
                <View style={styles.stepNumber}>
                  <Text weight="bold" tone="onBrand" variant="caption">
                    {i + 1}
                  </Text>
                </View>
                <View style={styles.stepText}>
                  <Text weight="semibold">{step.title}</Text>
                  <Text variant="caption" tone="muted">
                    {step.body}
                  </Text>
                </View>
              </View>
            ))}
          </View>
        </Center>
        <Center>
          <CautionNote />
        </Center>
      </Content>
    </Screen>
  );
}

const styles = StyleSheet.create({
  content: { justifyContent: 'space-between', gap: space.xxl },
  columns: { gap: space.xxl, paddingTop: space.xl },
  columnsWide: { flexDirection: 'row', alignItems: 'center', paddingTop: space.xxxl * 2, gap: space.xxxl * 1.5 },
  intro: { gap: space.md },
  introWide: { flex: 1.1 },
  brandRow: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  tagline: { marginTop: space.sm },
  body: { maxWidth: 480 },
  signIn: { alignSelf: 'stretch', marginTop: space.lg, maxWidth: 360 },
  alert: { backgroundColor: color.abnormalSoft, borderRadius: radius.md, padding: space.md, maxWidth: 480, marginTop: space.sm },
  notice: { backgroundColor: color.normalSoft, borderRadius: radius.md, padding: space.md, maxWidth: 480, marginTop: space.sm },
  steps: {
    backgroundColor: color.surface,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: color.line,
    padding: space.lg,
    gap: space.lg,
  },
  stepsWide: { flex: 1, padding: space.xl },
  step: { flexDirection: 'row', gap: space.md, alignItems: 'flex-start' },
  stepNumber: {
    width: 26,
    height: 26,
    borderRadius: radius.pill,
    backgroundColor: color.brand,
    alignItems: 'center',
    justifyContent: 'center',
    marginTop: 1,
  },
  stepText: { flex: 1, gap: space.xxs },
});
