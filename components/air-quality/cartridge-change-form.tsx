"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { SelectField, TextField, useSchemaForm } from "@/components/admin/form-kit";
import { utcToZonedLocal, zonedLocalToUtc } from "@/components/events/zoned-time";
import { attachmentAccept } from "@/shared/attachment-schema";
import { postRecord } from "./post-record";
import { cartridgeChangeInputSchema } from "@/shared/air-quality-schema";
import type { UnitChoice } from "./air-test-form";

type V = { compressorId: string; changedAt: string; hourMeterH: string; lot: string; note: string };

export function CartridgeChangeForm({ units }: { units: UnitChoice[] }) {
  const router = useRouter();
  const [done, setDone] = useState(false);
  const [file, setFile] = useState<File | null>(null);
  const [fileKey, setFileKey] = useState(0);
  const first = units[0];
  const initial: V = { compressorId: first ? String(first.id) : "", changedAt: first ? utcToZonedLocal(Date.now(), first.timeZone) : "", hourMeterH: "", lot: "", note: "" };
  const unitOf = (v: V) => units.find((u) => String(u.id) === v.compressorId);
  const form = useSchemaForm<V>({
    schema: cartridgeChangeInputSchema,
    initial,
    toInput: (v) => ({
      compressorId: Number(v.compressorId),
      changedAt: unitOf(v) ? (zonedLocalToUtc(v.changedAt, unitOf(v)!.timeZone) ?? undefined) : undefined,
      hourMeterH: v.hourMeterH.trim() === "" ? undefined : Number(v.hourMeterH.replace(",", ".")),
      lot: v.lot,
      note: v.note,
    }),
  });
  return (
    <form
      ref={form.formRef}
      noValidate
      aria-labelledby={`${form.id}-h`}
      className="space-y-3 rounded border border-line bg-raised p-4"
      onSubmit={async (e) => {
        e.preventDefault();
        if (await form.submit((input) => postRecord<{ id: number }>("/api/air-quality/cartridge-changes", input, file))) {
          setDone(true);
          form.reset(initial);
          setFile(null);
          setFileKey((k) => k + 1);
          router.refresh();
        }
      }}
    >
      <h2 id={`${form.id}-h`} className="text-lg font-semibold">
        Log a cartridge change
      </h2>
      <div className="grid gap-3 sm:grid-cols-4">
        <SelectField form={form} name="compressorId" label="Compressor" options={units.map((u) => ({ value: String(u.id), label: `${u.name} (${u.siteName})` }))} />
        <div>
          <label htmlFor={form.fieldId("changedAt")} className="block text-xs font-semibold text-muted">
            Changed at
          </label>
          <input
            id={form.fieldId("changedAt")}
            type="datetime-local"
            value={form.values.changedAt}
            onChange={(e) => form.set("changedAt", e.target.value)}
            aria-invalid={form.errorOf("changedAt") ? true : undefined}
            className="mt-0.5 w-full rounded border border-line bg-white px-2 py-1 text-sm"
          />
          {form.errorOf("changedAt") && <p className="mt-0.5 border-l-4 border-ink pl-1.5 text-xs font-semibold">{form.errorOf("changedAt")}</p>}
        </div>
        <TextField form={form} name="hourMeterH" label="Hour meter" unit="h" numeric />
        <TextField form={form} name="lot" label="Cartridge lot number" />
      </div>
      <TextField form={form} name="note" label="Note" />
      <div>
        <label htmlFor={`${form.id}-photo`} className="block text-xs font-semibold text-muted">
          Photo (optional)
        </label>
        <input key={fileKey} id={`${form.id}-photo`} name="photo" type="file" accept={attachmentAccept} onChange={(e) => setFile(e.target.files?.[0] ?? null)} className="mt-0.5 text-sm" />
        {form.errorOf("photo" as keyof V & string) && <p className="mt-0.5 border-l-4 border-ink pl-1.5 text-xs font-semibold">{form.errorOf("photo" as keyof V & string)}</p>}
      </div>
      {form.formError && (
        <p role="alert" className="font-semibold">
          {form.formError}
        </p>
      )}
      {done && <p role="status">Cartridge change logged; the count starts again.</p>}
      <button type="submit" disabled={form.pending} className="rounded border border-ink bg-ink px-3 py-1 text-sm font-semibold text-white disabled:opacity-50">
        {form.pending ? "Saving…" : "Log change"}
      </button>
    </form>
  );
}
