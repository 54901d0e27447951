"use client";

import { useSyncExternalStore } from "react";

// The server's clock as seen from this browser: ages are computed against server time (readings are stamped
// with the server's receive time), so a wall screen with a wrong clock still shows correct ages.

let skewMs = 0;

/** Records a server timestamp that has just arrived (a live message's `at`). */
export function noteServerTime(serverAt: number): void {
  if (Number.isFinite(serverAt)) skewMs = serverAt - Date.now();
}

export function serverNow(): number {
  return Date.now() + skewMs;
}

let current: number | null = null;
let timer: ReturnType<typeof setInterval> | null = null;
const listeners = new Set<() => void>();

function tick() {
  current = serverNow();
  for (const l of listeners) l();
}

function subscribe(listener: () => void): () => void {
  listeners.add(listener);
  if (!timer) {
    current = serverNow();
    timer = setInterval(tick, 1_000);
  }
  return () => {
    listeners.delete(listener);
    if (!listeners.size && timer) {
      clearInterval(timer);
      timer = null;
    }
  };
}

/**
 * Server time, ticking once a second. Until the component has mounted it returns `initial` (the server time the
 * data was read), so the server's HTML and the first client render agree.
 */
export function useServerNow(initial: number): number {
  const now = useSyncExternalStore(
    subscribe,
    () => current,
    () => null,
  );
  return now ?? initial;
}
