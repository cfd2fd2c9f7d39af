import { useEffect } from 'react';
import { Platform } from 'react-native';
import { Redirect, Slot, usePathname } from 'expo-router';
import { AppShell } from '../../components/app-shell';
import { prefetchLaterScreens } from '../../components/later-screens';
import { NoAccess } from '../../components/no-access';
import { ErrorState, LoadingState } from '../../components/ui/async-states';
import { Center, Content, Screen } from '../../components/ui/layout';
import { ApiError } from '../../components/data/api';
import { useMeQuery } from '../../components/data/me-query';

/** The address this page load began at, read before the router changes anything. */
const entryPath = typeof window !== 'undefined' && window.location ? window.location.pathname + window.location.search : '/';
let signedInThisVisit = false;

/** Every signed-in screen passes here: signed-out users go to sign-in, users without a role see why. */
export default function SignedInLayout() {
  const me = useMeQuery();
  const pathname = usePathname();
  // Once a signed-in user's first screen is up, the other screens' chunk downloads in the background.
  const signedIn = Boolean(me.data?.role);
  useEffect(() => (signedIn && Platform.OS === 'web' ? prefetchLaterScreens() : undefined), [signedIn]);
  if (me.isPending) {
    return (
      <Screen>
        <Content>
          <Center>
            <LoadingState label="Checking your session…" testID="session-loading" />
          </Center>
        </Content>
      </Screen>
    );
  }
  if (me.error instanceof ApiError && me.error.status === 401) {
    // Not signed in on arrival: the address the page was opened at (the router may already have
    // moved to the list by now); later in the visit, where the user is.
    const here = Platform.OS === 'web' ? (signedInThisVisit ? window.location.pathname + window.location.search : entryPath) : pathname;
    return <ToSignIn href={here && here !== '/' ? `/sign-in?returnTo=${encodeURIComponent(here)}` : '/sign-in'} />;
  }
  if (me.isError) {
    return (
      <Screen>
        <Content>
          <Center>
            <ErrorState title="Isobar could not check your session" detail={me.error.message} onRetry={() => me.refetch()} />
          </Center>
        </Content>
      </Screen>
    );
  }
  signedInThisVisit = true;
  if (!me.data.role) return <NoAccess me={me.data} />;
  return (
    <AppShell me={me.data}>
      <Slot />
    </AppShell>
  );
}

/**
 * To the sign-in page, keeping where the user was going. On the web a full page load: an in-app
 * redirect from here lost the link's path (the router fell back to the list first).
 */
function ToSignIn({ href }: { href: string }) {
  useEffect(() => {
    if (Platform.OS === 'web') window.location.replace(href);
  }, [href]);
  if (Platform.OS !== 'web') return <Redirect href={href as '/sign-in'} />;
  return (
    <Screen>
      <Content>
        <Center>
          <LoadingState label="Taking you to sign-in…" testID="to-sign-in" />
        </Center>
      </Content>
    </Screen>
  );
}
