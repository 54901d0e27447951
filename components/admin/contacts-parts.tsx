"use client";

import { useState } from "react";
import type { Priority } from "@/shared/alarm-rules";
import { formatLocal, priorityWord } from "@/shared/notify-text";
import { buttonClass } from "./form-kit";

/** "Local time there: 2025-03-30 03:30:00 CEST" for the moment the list was computed. */
export function LocalNow({ timeZone, at }: { timeZone: string; at: number }) {
  return (
    <span suppressHydrationWarning>
      {timeZone}, <span className="num">{formatLocal(at, timeZone).slice(0, 16)}</span> {formatLocal(at, timeZone).slice(20)}
    </span>
  );
}

const shapeClass: Record<Priority, string> = { critical: "shape-critical", warning: "shape-warning", advisory: "shape-advisory" };

/** A priority named in a rule: shape and word, in ink (colour is kept for alarms that are actually abnormal). */
export function PriorityName({ priority, suffix }: { priority: Priority; suffix?: string }) {
  return (
    <span className="inline-flex items-center gap-1">
      <span aria-hidden className={`${shapeClass[priority]} inline-block size-2.5 bg-muted`} />
      {priorityWord[priority]}
      {suffix}
    </span>
  );
}

/** Delete with a second click to confirm; onConfirm returns an error message or null. */
export function ConfirmDelete({ label, warning, onConfirm }: { label: string; warning?: string; onConfirm: () => Promise<string | null> }) {
  const [confirming, setConfirming] = useState(false);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);
  async function run() {
    setPending(true);
    setError(null);
    try {
      const problem = await onConfirm();
      if (problem) setError(problem);
    } catch {
      setError("The server could not be reached.");
    } finally {
      setPending(false);
      setConfirming(false);
    }
  }
  return (
    <span className="inline-flex flex-wrap items-center gap-1">
      {confirming ? (
        <>
          {warning && <span className="text-xs font-semibold">{warning}</span>}
          <button type="button" className={`${buttonClass.small} border-ink font-semibold`} onClick={run} disabled={pending} aria-label={`Confirm: ${label}`}>
            Confirm delete
          </button>
          <button type="button" className={buttonClass.small} onClick={() => setConfirming(false)} disabled={pending}>
            Keep
          </button>
        </>
      ) : (
        <button type="button" className={buttonClass.small} onClick={() => setConfirming(true)} aria-label={label}>
          Delete
        </button>
      )}
      {error && (
        <span role="alert" className="text-xs font-semibold text-ink">
          {error}
        </span>
      )}
    </span>
  );
}
