"use client";

import { useQuery } from "@tanstack/react-query";
import type { DeviceEventDto } from "@/shared/board";
import { tripCodeLabel } from "@/shared/trip-codes";
import { siteDateTime } from "../board/format";
import { trendQueries } from "../queries/trends";

const kindText: Record<DeviceEventDto["kind"], string> = {
  comms_lost: "Comms lost",
  comms_restored: "Comms restored",
  state: "State change",
  trip: "Trip",
};

const stateText: Record<NonNullable<DeviceEventDto["runState"]>, string> = {
  stopped: "Stopped",
  standby: "Standby",
  starting: "Starting",
  running: "Running",
  tripped: "Tripped",
};

function Kind({ kind }: { kind: DeviceEventDto["kind"] }) {
  if (kind === "trip") {
    return (
      <span className="inline-flex items-center gap-1 font-semibold">
        <span aria-hidden className="shape-critical inline-block size-3 bg-critical" />
        {kindText[kind]}
      </span>
    );
  }
  if (kind === "comms_lost") {
    return <span className="hatch-stale rounded border border-dashed border-faint px-1 font-semibold">{kindText[kind]}</span>;
  }
  return <span>{kindText[kind]}</span>;
}

/** Comms losses and restorations, state changes and trips the machine reported, newest first, in site time. */
export function DeviceEvents({ compressorId, timeZone }: { compressorId: number; timeZone: string }) {
  const q = useQuery(trendQueries.events(compressorId));
  return (
    <section aria-labelledby="device-events-title" className="space-y-2">
      <h2 id="device-events-title" className="text-lg font-semibold">
        Device events
      </h2>
      <p className="text-xs text-muted">Newest first, the last 100. Times are the device&apos;s, in the site&apos;s time zone ({timeZone}).</p>
      {q.error && <p role="alert">{q.error.message}</p>}
      <div className="max-h-96 overflow-y-auto rounded border border-line bg-raised">
        <table className="w-full border-collapse text-sm" data-testid="device-events">
          <thead className="sticky top-0 bg-panel">
            <tr className="text-left text-xs text-muted">
              <th scope="col" className="px-2 py-1">Time</th>
              <th scope="col" className="px-2 py-1">Event</th>
              <th scope="col" className="px-2 py-1">State</th>
              <th scope="col" className="px-2 py-1">Detail</th>
            </tr>
          </thead>
          <tbody>
            {(q.data ?? []).map((e) => (
              <tr key={e.id} className="border-t border-line align-top">
                <td className="num whitespace-nowrap px-2 py-1">{siteDateTime(e.ts, timeZone)}</td>
                <td className="px-2 py-1">
                  <Kind kind={e.kind} />
                </td>
                <td className="px-2 py-1">{e.runState ? stateText[e.runState] : "—"}</td>
                <td className="px-2 py-1">
                  {[e.tripCode != null ? `${tripCodeLabel(e.tripCode)} (code ${e.tripCode})` : "", e.text].filter(Boolean).join(" · ") || "—"}
                </td>
              </tr>
            ))}
            {q.data?.length === 0 && (
              <tr>
                <td colSpan={4} className="px-2 py-3 text-muted">
                  No events recorded for this unit.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
    </section>
  );
}
