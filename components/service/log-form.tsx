"use client";

import { useId, useState } from "react";
import { logService } from "@/lib/actions/service";
import { utcToZonedLocal, zonedLocalToUtc } from "@/shared/zoned-time";
import { attachmentAccept, MAX_ATTACHMENT_BYTES, type AttachmentDto } from "@/shared/attachment-schema";
import type { ServiceOverviewDto } from "@/shared/service-schema";

export type LogPrefill = { compressorId: number; tasks: string[]; key: number };

type FileResult = { name: string; ok: boolean; message: string };

/** Sends one file to the streamed upload route; the answer says what became of it. */
export async function uploadFile(ownerKind: string, ownerId: number, file: File): Promise<FileResult> {
  if (file.size > MAX_ATTACHMENT_BYTES) return { name: file.name, ok: false, message: `larger than ${MAX_ATTACHMENT_BYTES / 1024 / 1024} MB, not sent` };
  const form = new FormData();
  form.append("file", file, file.name);
  try {
    const res = await fetch(`/api/attachments?ownerKind=${ownerKind}&ownerId=${ownerId}`, { method: "POST", body: form, credentials: "same-origin" });
    const body = (await res.json().catch(() => null)) as { error?: string; notice?: string | null; attachment?: AttachmentDto | null } | null;
    if (res.ok) return { name: file.name, ok: true, message: body?.notice ?? "attached" };
    return { name: file.name, ok: false, message: body?.error ?? `refused (${res.status})` };
  } catch {
    return { name: file.name, ok: false, message: "the connection failed before the file was kept; attach it again from the entry" };
  }
}

const field = "mt-0.5 w-full rounded border border-line bg-white px-2 py-1 text-sm text-ink";

export function LogForm({
  data,
  prefill,
  newSubmissionId,
  onLogged,
}: {
  data: ServiceOverviewDto;
  prefill: LogPrefill | null;
  newSubmissionId: () => string;
  onLogged: () => void;
}) {
  const id = useId();
  const [compressorId, setCompressorId] = useState<number | null>(prefill?.compressorId ?? null);
  const unit = data.compressors.find((c) => c.id === compressorId) ?? null;
  const [tasks, setTasks] = useState<Set<string>>(new Set(prefill?.tasks ?? []));
  const [doneAt, setDoneAt] = useState(() => (unit ? utcToZonedLocal(Date.now(), unit.timeZone) : ""));
  const [hourMeter, setHourMeter] = useState("");
  const [parts, setParts] = useState("");
  const [notes, setNotes] = useState("");
  const [files, setFiles] = useState<File[]>([]);
  const [submissionId, setSubmissionId] = useState(newSubmissionId);
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [fileResults, setFileResults] = useState<FileResult[]>([]);

  const choose = (cid: number | null) => {
    setCompressorId(cid);
    setTasks(new Set());
    const u = data.compressors.find((c) => c.id === cid);
    if (u && !doneAt) setDoneAt(utcToZonedLocal(Date.now(), u.timeZone));
  };

  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    if (busy) return;
    setErrors({});
    setMessage(null);
    setFileResults([]);
    if (!unit) return setErrors({ compressorId: ["Choose a compressor"] });
    const at = zonedLocalToUtc(doneAt, unit.timeZone);
    if (at === null) return setErrors({ doneAt: ["Enter the date and time"] });
    const meter = hourMeter.trim() === "" ? null : Number(hourMeter);
    if (meter !== null && !Number.isFinite(meter)) return setErrors({ hourMeterH: ["Enter a number of hours, or leave it empty"] });
    setBusy(true);
    try {
      const r = await logService({ submissionId, compressorId: unit.id, tasks: [...tasks], doneAt: at, hourMeterH: meter, parts, notes });
      if (!r.ok) {
        setErrors(r.fieldErrors ?? {});
        setMessage(r.error);
        return;
      }
      const results: FileResult[] = [];
      for (const f of files) results.push(await uploadFile("service_log", r.data.id, f));
      setFileResults(results);
      const failed = results.filter((x) => !x.ok).length;
      setMessage(
        `${r.data.duplicate ? "Already logged" : "Logged"} on ${unit.name}.${files.length ? ` ${results.length - failed} of ${files.length} file${files.length === 1 ? "" : "s"} attached.` : ""}`,
      );
      setSubmissionId(newSubmissionId());
      setTasks(new Set());
      setHourMeter("");
      setParts("");
      setNotes("");
      setFiles([]);
      onLogged();
    } finally {
      setBusy(false);
    }
  };

  const err = (k: string) =>
    errors[k]?.length ? (
      <p className="text-xs font-semibold text-ink" role="alert">
        {errors[k]!.join(" ")}
      </p>
    ) : null;

  return (
    <form onSubmit={submit} className="space-y-3 rounded border border-line bg-raised p-4" aria-labelledby={`${id}-title`} data-testid="log-form">
      <h2 id={`${id}-title`} className="text-lg font-semibold">
        Record service
      </h2>
      <div className="grid gap-3 sm:grid-cols-3">
        <div>
          <label htmlFor={`${id}-c`} className="block text-xs font-semibold text-muted">Compressor</label>
          <select id={`${id}-c`} value={compressorId ?? ""} onChange={(e) => choose(e.target.value ? Number(e.target.value) : null)} className={field}>
            <option value="">Choose…</option>
            {data.compressors.map((c) => (
              <option key={c.id} value={c.id}>
                {c.name}
              </option>
            ))}
          </select>
          {err("compressorId")}
        </div>
        <div>
          <label htmlFor={`${id}-t`} className="block text-xs font-semibold text-muted">
            Done at {unit ? <span className="font-normal">({unit.timeZone})</span> : null}
          </label>
          <input id={`${id}-t`} type="datetime-local" value={doneAt} onChange={(e) => setDoneAt(e.target.value)} className={field} />
          {err("doneAt")}
        </div>
        <div>
          <label htmlFor={`${id}-h`} className="block text-xs font-semibold text-muted">Hour meter (h) — empty: from telemetry</label>
          <input id={`${id}-h`} inputMode="decimal" value={hourMeter} onChange={(e) => setHourMeter(e.target.value)} className={`${field} num`} />
          {err("hourMeterH")}
        </div>
      </div>
      <fieldset>
        <legend className="text-xs font-semibold text-muted">Tasks done</legend>
        {!unit && <p className="text-sm text-muted">Choose a compressor to see its plan.</p>}
        <div className="mt-1 flex flex-wrap gap-x-4 gap-y-1">
          {unit?.tasks.map((t) => (
            <label key={t.code} className="inline-flex items-center gap-1 text-sm">
              <input
                type="checkbox"
                checked={tasks.has(t.code)}
                onChange={(e) => {
                  const next = new Set(tasks);
                  if (e.target.checked) next.add(t.code);
                  else next.delete(t.code);
                  setTasks(next);
                }}
              />
              {t.name}
            </label>
          ))}
        </div>
        {err("tasks")}
      </fieldset>
      <div className="grid gap-3 sm:grid-cols-2">
        <div>
          <label htmlFor={`${id}-p`} className="block text-xs font-semibold text-muted">Parts</label>
          <textarea id={`${id}-p`} rows={2} maxLength={2000} value={parts} onChange={(e) => setParts(e.target.value)} className={field} />
        </div>
        <div>
          <label htmlFor={`${id}-n`} className="block text-xs font-semibold text-muted">Notes</label>
          <textarea id={`${id}-n`} rows={2} maxLength={4000} value={notes} onChange={(e) => setNotes(e.target.value)} className={field} />
        </div>
      </div>
      <div>
        <label htmlFor={`${id}-f`} className="block text-xs font-semibold text-muted">Photos and PDF worksheets (up to 20 MB each)</label>
        <input id={`${id}-f`} type="file" multiple accept={attachmentAccept} onChange={(e) => setFiles([...(e.target.files ?? [])])} className="mt-0.5 text-sm" />
      </div>
      <div className="flex items-center gap-3">
        <button type="submit" disabled={busy} className="rounded border border-ink bg-ink px-3 py-1 text-sm font-semibold text-white disabled:opacity-50">
          {busy ? "Saving…" : "Record service"}
        </button>
        {message && (
          <p className="text-sm" role="status" data-testid="log-message">
            {message}
          </p>
        )}
      </div>
      {fileResults.length > 0 && (
        <ul className="text-sm" data-testid="file-results">
          {fileResults.map((f, i) => (
            <li key={i} className={f.ok ? "text-muted" : "font-semibold text-ink"}>
              {f.name}: {f.message}
            </li>
          ))}
        </ul>
      )}
    </form>
  );
}
