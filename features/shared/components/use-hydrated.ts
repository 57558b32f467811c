"use client";

import { useSyncExternalStore } from "react";

const subscribe = () => () => {};

/**
 * False on the server and during hydration, true once React has attached its handlers. A control whose work
 * happens only in the browser (a file picker that uploads on change) stays disabled until then, so a choice made
 * on a slow phone before the page is live is never silently dropped.
 */
export function useHydrated(): boolean {
  return useSyncExternalStore(
    subscribe,
    () => true,
    () => false,
  );
}
