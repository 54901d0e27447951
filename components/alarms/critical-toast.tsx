"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { useEffect, useState } from "react";
import type { AlarmDto } from "@/shared/alarm-schema";
import { alarmQueries } from "../queries/alarms";

const STORAGE_KEY = "airkeep.critical-alarms-seen";

function readSeen(): Set<number> {
  try {
    const raw = window.sessionStorage.getItem(STORAGE_KEY);
    const ids = raw ? (JSON.parse(raw) as unknown) : [];
    return new Set(Array.isArray(ids) ? ids.filter((x): x is number => typeof x === "number") : []);
  } catch {
    return new Set();
  }
}

function writeSeen(ids: Set<number>): void {
  try {
    // Only the most recent ids are worth keeping for a session.
    window.sessionStorage.setItem(STORAGE_KEY, JSON.stringify([...ids].slice(-500)));
  } catch {
    // Storage full or refused: the worst case is an announcement repeated after a reload.
  }
}

/**
 * Announces a critical alarm that is new to this browser session: polls the critical alarms every 5 s, remembers
 * the ids already announced in sessionStorage (so navigating or reloading does not repeat them), and speaks through
 * an assertive live region that is always in the page. Dismissed toasts stay dismissed.
 */
export function CriticalToast() {
  const { data } = useQuery(alarmQueries.critical());
  const [fresh, setFresh] = useState<AlarmDto[]>([]);

  useEffect(() => {
    if (!data) return;
    const seen = readSeen();
    const unannounced = data.alarms.filter((a) => a.state === "active-unacknowledged" && !seen.has(a.id));
    if (!unannounced.length) return;
    for (const a of unannounced) seen.add(a.id);
    writeSeen(seen);
    // Announced ids live in sessionStorage (outside React), so the toast list follows it from an effect.
    // eslint-disable-next-line react-hooks/set-state-in-effect
    setFresh((old) => [...unannounced, ...old.filter((o) => !unannounced.some((u) => u.id === o.id))].slice(0, 5));
  }, [data]);

  const dismiss = (id: number) => setFresh((old) => old.filter((a) => a.id !== id));

  return (
    <div aria-live="assertive" aria-atomic="false" aria-relevant="additions" className="pointer-events-none fixed right-3 bottom-14 z-50 flex w-[min(26rem,calc(100vw-1.5rem))] flex-col gap-2" data-testid="critical-toasts">
      {fresh.map((a) => (
        <div
          key={a.id}
          data-testid="critical-toast"
          data-alarm-id={a.id}
          className="pointer-events-auto rounded border-2 border-critical bg-raised p-2 shadow-lg"
        >
          <div className="flex items-start gap-2">
            <span className="mt-0.5 inline-flex items-center gap-1 rounded bg-critical px-1.5 py-0.5 text-xs font-bold tracking-wide text-critical-ink uppercase">
              <span aria-hidden className="shape-critical inline-block size-[0.9em] bg-critical-ink" />
              Critical
            </span>
            <div className="min-w-0 flex-1 text-sm">
              <p className="font-semibold">{a.title}</p>
              <p className="text-muted">
                {a.compressorName}, {a.siteName}
              </p>
              <Link href={`/alarms?id=${a.id}`} className="font-semibold text-ink" onClick={() => dismiss(a.id)}>
                Open the alarm
              </Link>
            </div>
            <button
              type="button"
              onClick={() => dismiss(a.id)}
              className="rounded border border-line px-1.5 text-sm text-ink hover:bg-panel"
              aria-label={`Dismiss: ${a.title} on ${a.compressorName}`}
            >
              ×
            </button>
          </div>
        </div>
      ))}
    </div>
  );
}
