"use client";

import { useId, useState } from "react";
import { addServiceWindow } from "@/lib/actions/service";
import { formatZoned, zonedLocalToUtc } from "@/shared/zoned-time";
import type { ServiceOverviewDto } from "@/shared/service-schema";

/** Planned service windows: the monthly report shows their time as planned service, apart from outages. */
export function WindowsPanel({ data, canAdd, onAdded }: { data: ServiceOverviewDto; canAdd: boolean; onAdded: () => void }) {
  const id = useId();
  const [compressorId, setCompressorId] = useState<number | null>(null);
  const [start, setStart] = useState("");
  const [end, setEnd] = useState("");
  const [reason, setReason] = useState("");
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const unit = data.compressors.find((c) => c.id === compressorId) ?? null;
  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    if (busy) return;
    if (!unit) return setMessage("Choose a compressor");
    const s = zonedLocalToUtc(start, unit.timeZone);
    const t = zonedLocalToUtc(end, unit.timeZone);
    if (s === null || t === null) return setMessage("Enter the start and the end");
    setBusy(true);
    const r = await addServiceWindow({ compressorId: unit.id, startAt: s, endAt: t, reason });
    setBusy(false);
    if (r.ok) {
      setMessage("Planned service window saved; the monthly report counts it as planned service.");
      setStart("");
      setEnd("");
      setReason("");
      onAdded();
    } else setMessage([r.error, ...Object.values(r.fieldErrors ?? {}).flat()].join(" "));
  };
  const f = "mt-0.5 w-full rounded border border-line bg-white px-2 py-1 text-sm";
  return (
    <section className="space-y-2" aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`} className="text-lg font-semibold">
        Planned service windows
      </h2>
      {data.windows.length === 0 ? (
        <p className="text-sm text-muted">None in the last 30 days or ahead.</p>
      ) : (
        <ul className="text-sm" data-testid="service-windows">
          {data.windows.map((w) => (
            <li key={w.id}>
              <span className="font-semibold">{w.compressorName}</span>{" "}
              <span className="num">
                {formatZoned(w.startAt, w.timeZone).slice(0, 16)} – {formatZoned(w.endAt, w.timeZone).slice(0, 16)}
              </span>{" "}
              <span className="text-muted">{w.reason}</span>
            </li>
          ))}
        </ul>
      )}
      {canAdd && (
        <form onSubmit={submit} className="grid gap-2 rounded border border-line bg-raised p-3 sm:grid-cols-4">
          <label className="text-xs text-muted" htmlFor={`${id}-c`}>
            Compressor
            <select id={`${id}-c`} value={compressorId ?? ""} onChange={(e) => setCompressorId(e.target.value ? Number(e.target.value) : null)} className={f}>
              <option value="">Choose…</option>
              {data.compressors.map((c) => (
                <option key={c.id} value={c.id}>
                  {c.name}
                </option>
              ))}
            </select>
          </label>
          <label className="text-xs text-muted" htmlFor={`${id}-s`}>
            Start {unit && `(${unit.timeZone})`}
            <input id={`${id}-s`} type="datetime-local" value={start} onChange={(e) => setStart(e.target.value)} className={f} />
          </label>
          <label className="text-xs text-muted" htmlFor={`${id}-e`}>
            End
            <input id={`${id}-e`} type="datetime-local" value={end} onChange={(e) => setEnd(e.target.value)} className={f} />
          </label>
          <label className="text-xs text-muted" htmlFor={`${id}-r`}>
            Reason
            <input id={`${id}-r`} value={reason} onChange={(e) => setReason(e.target.value)} className={f} />
          </label>
          <div className="flex items-center gap-2 sm:col-span-4">
            <button type="submit" disabled={busy} className="rounded border border-line px-2 py-1 text-sm font-semibold">
              Add window
            </button>
            {message && <span className="text-sm" role="status">{message}</span>}
          </div>
        </form>
      )}
    </section>
  );
}
