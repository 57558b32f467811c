"use client";

import { useSyncExternalStore } from "react";

// The clock as an external store: read when a component subscribes and once a minute after, never during render,
// so components stay pure. The server (and hydration) sees null, so server and browser render the same first.
const MINUTE = 60_000;
const listeners = new Set<() => void>();
let current = 0;
let timer: ReturnType<typeof setInterval> | null = null;

function subscribe(notify: () => void): () => void {
  listeners.add(notify);
  if (!timer) {
    current = Date.now();
    timer = setInterval(() => {
      current = Date.now();
      listeners.forEach((l) => l());
    }, MINUTE);
  }
  return () => {
    listeners.delete(notify);
    if (listeners.size === 0 && timer) {
      clearInterval(timer);
      timer = null;
      current = 0;
    }
  };
}

// Stable between calls until the next tick, as useSyncExternalStore requires.
const snapshot = () => current || (current = Date.now());
const serverSnapshot = () => null;

/** Milliseconds since the epoch, updated every minute; null on the server and during hydration. */
export function useNow(): number | null {
  return useSyncExternalStore(subscribe, snapshot, serverSnapshot);
}
