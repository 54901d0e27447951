"use client";

import { useEffect, useRef } from "react";
import type { FormApi } from "@/components/admin/form-kit";
import { utcToZonedLocal, zonedLocalToUtc } from "@/shared/zoned-time";
import { attachmentAccept } from "@/shared/attachment-schema";

type Values = Record<string, unknown>;

const errorClass = "mt-0.5 border-l-4 border-ink pl-1.5 text-xs font-semibold";

/** Keeps a site-time field on the same instant when another compressor (another site's time zone) is chosen. */
export function useFollowZone<V extends Values>(form: FormApi<V>, name: keyof V & string, timeZone: string | undefined) {
  const previous = useRef(timeZone);
  const value = String(form.values[name] ?? "");
  useEffect(() => {
    const from = previous.current;
    previous.current = timeZone;
    if (!from || !timeZone || from === timeZone || !value) return;
    const ms = zonedLocalToUtc(value, from);
    if (ms !== null) form.set(name, utcToZonedLocal(ms, timeZone) as V[typeof name]);
    // Only a change of zone moves the value; typing in the field does not.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [timeZone]);
}

/** A datetime-local input for a time in the site's zone, with its error beside it. */
export function LocalDateTimeField<V extends Values>({ form, name, label }: { form: FormApi<V>; name: keyof V & string; label: string }) {
  const id = form.fieldId(name);
  const error = form.errorOf(name);
  return (
    <div>
      <label htmlFor={id} className="block text-xs font-semibold text-muted">
        {label}
      </label>
      <input
        id={id}
        type="datetime-local"
        value={String(form.values[name] ?? "")}
        onChange={(e) => form.set(name, e.target.value as V[typeof name])}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className="mt-0.5 w-full rounded border border-line bg-white px-2 py-1 text-sm"
      />
      {error && (
        <p id={`${id}-error`} className={errorClass} data-field-error="">
          {error}
        </p>
      )}
    </div>
  );
}

/** One optional file (PDF or image); the server's refusal lands under it as `name`'s field error. */
export function FileField<V extends Values>({
  form,
  name,
  label,
  resetKey,
  onFile,
}: {
  form: FormApi<V>;
  name: string;
  label: string;
  resetKey: number;
  onFile: (f: File | null) => void;
}) {
  const id = `${form.id}-${name}`;
  const error = form.errorOf(name as keyof V & string);
  return (
    <div>
      <label htmlFor={id} className="block text-xs font-semibold text-muted">
        {label}
      </label>
      <input
        key={resetKey}
        id={id}
        name={name}
        type="file"
        accept={attachmentAccept}
        onChange={(e) => onFile(e.target.files?.[0] ?? null)}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className="mt-0.5 text-sm"
      />
      {error && (
        <p id={`${id}-error`} className={errorClass} data-field-error="">
          {error}
        </p>
      )}
    </div>
  );
}

export function SubmitRow({ pending, formError, done, label }: { pending: boolean; formError: string | null; done: string | null; label: string }) {
  return (
    <>
      {formError && (
        <p role="alert" className="font-semibold">
          {formError}
        </p>
      )}
      {done && <p role="status">{done}</p>}
      <button type="submit" disabled={pending} className="rounded border border-ink bg-ink px-3 py-1 text-sm font-semibold text-white disabled:opacity-50">
        {pending ? "Saving…" : label}
      </button>
    </>
  );
}
