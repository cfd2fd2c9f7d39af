import { useEffect } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { clearAllDrafts, signedOutKey } from './study/draft-store';

/**
 * A sign-out in one tab ends the session for every tab (they share the cookie): the others forget
 * what they hold and go to the sign-in page, so no patient data stays on screen or on the device.
 */
export function SessionSync() {
  const queryClient = useQueryClient();
  useEffect(() => {
    const onStorage = (e: StorageEvent) => {
      if (e.key !== signedOutKey || !e.newValue) return;
      queryClient.clear();
      clearAllDrafts();
      window.location.replace('/sign-in?signedOut=1');
    };
    globalThis.addEventListener?.('storage', onStorage);
    return () => globalThis.removeEventListener?.('storage', onStorage);
  }, [queryClient]);
  return null;
}
