"use client";

import { useEffect, useState } from "react";

export type WakeLockState = "held" | "released" | "unsupported";

/** Keeps a wall screen awake while `active` (Screen Wake Lock API), taking the lock again when the page is shown again. */
export function useWakeLock(active: boolean): WakeLockState {
  const [state, setState] = useState<WakeLockState>("released");
  useEffect(() => {
    if (!active) return;
    if (!("wakeLock" in navigator)) {
      // Browser-only fact, known after hydration so the server's HTML and the first client render agree.
      // eslint-disable-next-line react-hooks/set-state-in-effect
      setState("unsupported");
      return;
    }
    let sentinel: WakeLockSentinel | null = null;
    let cancelled = false;
    const acquire = async () => {
      if (document.visibilityState !== "visible" || (sentinel && !sentinel.released)) return;
      try {
        sentinel = await navigator.wakeLock.request("screen");
        if (cancelled) {
          void sentinel.release();
          return;
        }
        setState("held");
        sentinel.addEventListener("release", () => setState("released"));
      } catch {
        // Refused (battery saver, no user gesture yet): the screen may sleep; try again when the page is shown.
        setState("released");
      }
    };
    void acquire();
    document.addEventListener("visibilitychange", acquire);
    return () => {
      cancelled = true;
      document.removeEventListener("visibilitychange", acquire);
      void sentinel?.release();
    };
  }, [active]);
  return state;
}
