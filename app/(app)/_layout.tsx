import { Redirect, Slot, usePathname } from 'expo-router';
import { AppShell } from '../../components/app-shell';
import { NoAccess } from '../../components/no-access';
import { ErrorState, LoadingState } from '../../components/ui/async-states';
import { Center, Content, Screen } from '../../components/ui/layout';
import { ApiError } from '../../components/data/api';
import { useMeQuery } from '../../components/data/me-query';

/** Every signed-in screen passes here: signed-out users go to sign-in, users without a role see why. */
export default function SignedInLayout() {
  const me = useMeQuery();
  const pathname = usePathname();
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
    return <Redirect href={pathname && pathname !== '/' ? `/sign-in?returnTo=${encodeURIComponent(pathname)}` : '/sign-in'} />;
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
  if (!me.data.role) return <NoAccess me={me.data} />;
  return (
    <AppShell me={me.data}>
      <Slot />
    </AppShell>
  );
}
