"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import type { ActionResult } from "@/lib/api/action";
import { limitKey } from "@/shared/alarm-rules";
import type { ScopeType, ThresholdHistoryEntry, ThresholdRow, ThresholdSetDto } from "@/shared/threshold-schema";
import { buttonClass, FormAlert, StatusLine } from "../admin/form-kit";
import { siteDateTime } from "../board/format";
import { thresholdQueries, thresholdsKey } from "../queries/thresholds";
import { useUnits } from "../use-units";
import { lineLabel, rowText } from "./text";

type RevertResult = ActionResult<{ version: number }>;

/** Every change to the set, newest first, with who, when, why and each limit before → after; one click reverts one. */
export function HistoryTab({
  set,
  scopeType,
  scopeId,
  onRevert,
}: {
  set: ThresholdSetDto;
  scopeType: ScopeType;
  scopeId: number;
  onRevert: (input: unknown) => Promise<RevertResult>;
}) {
  const units = useUnits();
  const queryClient = useQueryClient();
  const q = useQuery(thresholdQueries.history(scopeType, scopeId));
  const [pending, setPending] = useState<number | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [status, setStatus] = useState<string | null>(null);
  const timeZone = scopeType === "compressor" ? (set.compressors[0]?.timeZone ?? "UTC") : "UTC";

  async function revert(entry: ThresholdHistoryEntry) {
    setPending(entry.id);
    setError(null);
    setStatus(null);
    try {
      const res = await onRevert({ auditId: entry.id, baseVersion: set.version });
      if (res.ok) setStatus(`Change #${entry.id} reverted: saved as version ${res.data.version}. The alarm engine applies it within about a second.`);
      else setError(res.error);
    } catch {
      setError("The server could not be reached. Check the connection and try again.");
    } finally {
      setPending(null);
      await queryClient.invalidateQueries({ queryKey: thresholdsKey });
    }
  }

  if (!q.data) return <p className="text-muted">{q.error ? q.error.message : "Loading…"}</p>;
  const entries = q.data;
  return (
    <div className="space-y-2">
      <p className="text-xs text-muted">
        Times in {timeZone === "UTC" ? "UTC" : `the site's time zone (${timeZone})`}. A revert puts the limits back as they were before that change;
        it is saved, checked and audited like any other change.
      </p>
      <FormAlert message={error} />
      <StatusLine message={status} />
      {entries.length === 0 ? (
        <p className="text-sm text-muted">No changes recorded yet.</p>
      ) : (
        <ol className="space-y-2" data-testid="history">
          {entries.map((e) => (
            <li key={e.id} className="rounded border border-line bg-raised p-2 text-sm" data-testid="history-entry">
              <div className="flex flex-wrap items-baseline gap-x-3">
                <span className="num">{siteDateTime(e.ts, timeZone)}</span>
                <span className="font-semibold">{e.actor}</span>
                <span className="num text-muted">
                  #{e.id} · version {e.fromVersion ?? "?"} → {e.toVersion ?? "?"}
                  {e.revertOf ? ` · reverts #${e.revertOf}` : ""}
                </span>
                <button
                  type="button"
                  className={`${buttonClass.small} ml-auto`}
                  disabled={pending !== null || set.readOnlyReason !== null}
                  title={set.readOnlyReason ?? undefined}
                  aria-label={`Revert change #${e.id}`}
                  onClick={() => revert(e)}
                >
                  {pending === e.id ? "Reverting…" : "Revert"}
                </button>
              </div>
              <p className="mt-0.5 italic">“{e.reason}”</p>
              <EntryChanges entry={e} units={units} none={scopeType === "compressor" ? "inherited" : "none"} />
            </li>
          ))}
        </ol>
      )}
      {set.readOnlyReason && <p className="text-sm text-muted">{set.readOnlyReason}</p>}
    </div>
  );
}

function EntryChanges({ entry, units, none }: { entry: ThresholdHistoryEntry; units: ReturnType<typeof useUnits>; none: string }) {
  const before = new Map<string, ThresholdRow>(entry.before.map((r) => [limitKey(r), r]));
  const after = new Map<string, ThresholdRow>(entry.after.map((r) => [limitKey(r), r]));
  return (
    <ul className="mt-1 space-y-0.5">
      {entry.changes.map((c) => {
        const a = before.get(c.key);
        const b = after.get(c.key);
        const r = (a ?? b)!;
        return (
          <li key={c.key}>
            {lineLabel(r)}:{" "}
            <span className="num">
              {a ? rowText(a, units) : none} → {b ? rowText(b, units) : none}
            </span>
          </li>
        );
      })}
    </ul>
  );
}
