import { lazy, Suspense, type ComponentType } from 'react';
import { Center, Content } from './ui/layout';
import { LoadingState } from './ui/async-states';

type Screens = typeof import('./screens')['screens'];

let loading: Promise<typeof import('./screens')> | undefined;

/** Loads the chunk of every screen after the first (once; a failed load is tried again next time). */
export function loadLaterScreens(): Promise<typeof import('./screens')> {
  loading ??= import('./screens').catch((error: unknown) => {
    loading = undefined;
    throw error;
  });
  return loading;
}

/**
 * A route's screen from the later-screens chunk (components/screens): the route file stays a few
 * lines, so the libraries of the forms never enter the first load. Shows "Loading…" the first
 * time, while the chunk arrives.
 */
export function laterScreen(name: keyof Screens): ComponentType {
  const Screen = lazy(() => loadLaterScreens().then((m) => ({ default: m.screens[name] as ComponentType })));
  function LaterScreen() {
    return (
      <Suspense
        fallback={
          <Content>
            <Center>
              <LoadingState label="Loading…" />
            </Center>
          </Content>
        }
      >
        <Screen />
      </Suspense>
    );
  }
  LaterScreen.displayName = `LaterScreen(${name})`;
  return LaterScreen;
}

/**
 * Fetches the later screens' chunk once the browser is idle after the first screen has shown, so
 * opening a study does not wait for it.
 */
export function prefetchLaterScreens(): () => void {
  if (typeof window === 'undefined') return () => {};
  const idle = (window as { requestIdleCallback?: (cb: () => void, opts?: { timeout: number }) => number }).requestIdleCallback;
  let idleId: number | undefined;
  const timer = setTimeout(() => {
    const run = () => void loadLaterScreens().catch(() => {});
    if (idle) idleId = idle(run, { timeout: 5_000 });
    else run();
  }, 1_000);
  return () => {
    clearTimeout(timer);
    if (idleId !== undefined) (window as { cancelIdleCallback?: (id: number) => void }).cancelIdleCallback?.(idleId);
  };
}
