import type { QueryClient } from '@tanstack/react-query';
import { meQueryOptions } from './me-query';
import { worklistQueryOptions } from './study-query';

/** Address parameters that filter the worklist (see the worklist screen). */
const worklistFilterParams = ['q', 'state', 'operator', 'when'];

/**
 * Starts the reads the first screen waits for, together, as soon as the app runs: who is signed in
 * and, on the worklist's own address without filters, its first page. Otherwise the worklist's read
 * would start only once the session check had answered and the screen had rendered, one round trip
 * after the other. The screens' hooks pick up these requests by their query keys. A signed-out
 * visitor's or another role's worklist read is refused (401/403) and nothing shows it.
 */
export function prefetchFirstScreen(queryClient: QueryClient, location: { pathname: string; search: string }): void {
  void queryClient.prefetchQuery(meQueryOptions());
  const params = new URLSearchParams(location.search);
  if (location.pathname === '/' && !worklistFilterParams.some((p) => params.has(p))) {
    // The same key as the screen's unfiltered list (undefined filters drop out of the key).
    void queryClient.prefetchInfiniteQuery(worklistQueryOptions({}));
  }
}
