"use client";

import { useId, useState } from "react";
import { correctServiceLog } from "@/lib/actions/service";
import { formatZoned, utcToZonedLocal, zonedLocalToUtc } from "@/shared/zoned-time";
import type { ServiceLogDto, ServiceOverviewDto } from "@/shared/service-schema";
import { uploadFile } from "./log-form";
import { attachmentAccept } from "@/shared/attachment-schema";

const kb = (n: number) => (n >= 1024 * 1024 ? `${(n / 1024 / 1024).toFixed(1)} MB` : `${Math.max(1, Math.round(n / 1024))} kB`);

export function ServiceLogList({
  data,
  q,
  onSearch,
  canCorrect,
  onChanged,
}: {
  data: ServiceOverviewDto;
  q: string;
  onSearch: (q: string) => void;
  canCorrect: boolean;
  onChanged: () => void;
}) {
  const id = useId();
  const [text, setText] = useState(q);
  return (
    <section className="space-y-2" aria-labelledby={`${id}-h`}>
      <div className="flex flex-wrap items-end justify-between gap-2">
        <h2 id={`${id}-h`} className="text-lg font-semibold">
          Service log
        </h2>
        <form
          role="search"
          onSubmit={(e) => {
            e.preventDefault();
            onSearch(text.trim());
          }}
          className="flex items-end gap-1"
        >
          <label htmlFor={`${id}-q`} className="sr-only">Search the service log</label>
          <input id={`${id}-q`} value={text} onChange={(e) => setText(e.target.value)} placeholder="Search tasks, parts, notes, people" className="rounded border border-line bg-white px-2 py-1 text-sm" />
          <button type="submit" className="rounded border border-line px-2 py-1 text-sm">Search</button>
        </form>
      </div>
      {data.log.length === 0 && <p className="text-sm text-muted">No entries{q ? ` matching “${q}”` : ""}.</p>}
      <ol className="space-y-2" data-testid="service-log">
        {data.log.map((e) => (
          <LogEntry key={e.id} e={e} canCorrect={canCorrect} onChanged={onChanged} />
        ))}
      </ol>
    </section>
  );
}

function LogEntry({ e, canCorrect, onChanged }: { e: ServiceLogDto; canCorrect: boolean; onChanged: () => void }) {
  const [correcting, setCorrecting] = useState(false);
  const [retry, setRetry] = useState<string | null>(null);
  return (
    <li className="rounded border border-line bg-raised p-3 text-sm" data-testid="log-entry" data-entry-id={e.id}>
      <div className="flex flex-wrap items-baseline gap-x-3">
        <span className="num font-semibold">{formatZoned(e.doneAt, e.timeZone).slice(0, 16)}</span>
        <span className="font-semibold">{e.compressorName}</span>
        <span className="text-muted">{e.siteName}</span>
        {e.hourMeterH !== null && <span className="num">{Math.round(e.hourMeterH).toLocaleString("en-GB")} h</span>}
        <span className="text-muted">by {e.performedByName}</span>
        {e.correctedAt !== null && <span className="text-xs font-semibold">corrected {formatZoned(e.correctedAt, e.timeZone).slice(0, 10)}</span>}
      </div>
      <p>{e.tasks.map((t) => t.name).join(", ")}</p>
      {e.parts && <p className="text-muted">Parts: {e.parts}</p>}
      {e.notes && <p className="whitespace-pre-line">{e.notes}</p>}
      {e.attachments.length > 0 && (
        <ul className="mt-1 flex flex-wrap gap-x-4" aria-label="Attachments">
          {e.attachments.map((a) =>
            a.status === "stored" ? (
              <li key={a.id}>
                <a href={`/api/attachments/${a.id}`} target="_blank" rel="noopener" className="underline" data-testid="attachment-link">
                  {a.name}
                </a>{" "}
                <span className="num text-muted">({kb(a.size)})</span>
              </li>
            ) : (
              <li key={a.id} className="font-semibold" data-testid="attachment-failed">
                {a.name}: upload failed — {a.error}
              </li>
            ),
          )}
        </ul>
      )}
      <div className="mt-1 flex items-center gap-2">
        <label className="text-xs text-muted">
          Attach more
          <input
            type="file"
            accept={attachmentAccept}
            className="ml-1 text-xs"
            onChange={async (ev) => {
              const f = ev.target.files?.[0];
              if (!f) return;
              const r = await uploadFile("service_log", e.id, f);
              setRetry(`${f.name}: ${r.message}`);
              onChanged();
            }}
          />
        </label>
        {retry && <span className="text-xs">{retry}</span>}
        {canCorrect && !correcting && (
          <button type="button" className="ml-auto rounded border border-line px-2 py-0.5 text-xs" onClick={() => setCorrecting(true)}>
            Correct
          </button>
        )}
      </div>
      {correcting && <CorrectionForm e={e} onDone={() => (setCorrecting(false), onChanged())} />}
    </li>
  );
}

function CorrectionForm({ e, onDone }: { e: ServiceLogDto; onDone: () => void }) {
  const id = useId();
  const [doneAt, setDoneAt] = useState(utcToZonedLocal(e.doneAt, e.timeZone));
  const [hours, setHours] = useState(e.hourMeterH === null ? "" : String(e.hourMeterH));
  const [parts, setParts] = useState(e.parts);
  const [notes, setNotes] = useState(e.notes);
  const [reason, setReason] = useState("");
  const [message, setMessage] = useState<string | null>(null);
  const save = async (ev: React.FormEvent) => {
    ev.preventDefault();
    const at = zonedLocalToUtc(doneAt, e.timeZone);
    if (at === null) return setMessage("Enter the date and time");
    const r = await correctServiceLog({ id: e.id, tasks: e.tasks.map((t) => t.code), doneAt: at, hourMeterH: hours.trim() === "" ? null : Number(hours), parts, notes, reason });
    if (r.ok) onDone();
    else setMessage([r.error, ...Object.values(r.fieldErrors ?? {}).flat()].join(" "));
  };
  const f = "mt-0.5 w-full rounded border border-line bg-white px-2 py-1 text-sm";
  return (
    <form onSubmit={save} className="mt-2 grid gap-2 border-t border-line pt-2 sm:grid-cols-2">
      <label className="text-xs text-muted" htmlFor={`${id}-t`}>
        Done at ({e.timeZone})
        <input id={`${id}-t`} type="datetime-local" value={doneAt} onChange={(x) => setDoneAt(x.target.value)} className={f} />
      </label>
      <label className="text-xs text-muted" htmlFor={`${id}-h`}>
        Hour meter (h)
        <input id={`${id}-h`} value={hours} onChange={(x) => setHours(x.target.value)} className={`${f} num`} />
      </label>
      <label className="text-xs text-muted" htmlFor={`${id}-p`}>
        Parts
        <input id={`${id}-p`} value={parts} onChange={(x) => setParts(x.target.value)} className={f} />
      </label>
      <label className="text-xs text-muted" htmlFor={`${id}-n`}>
        Notes
        <input id={`${id}-n`} value={notes} onChange={(x) => setNotes(x.target.value)} className={f} />
      </label>
      <label className="text-xs text-muted sm:col-span-2" htmlFor={`${id}-r`}>
        Reason for the correction (kept in the audit log)
        <input id={`${id}-r`} value={reason} onChange={(x) => setReason(x.target.value)} className={f} />
      </label>
      <div className="flex items-center gap-2 sm:col-span-2">
        <button type="submit" className="rounded border border-ink bg-ink px-2 py-0.5 text-xs font-semibold text-white">Save correction</button>
        {message && <span className="text-xs" role="alert">{message}</span>}
      </div>
    </form>
  );
}
