"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { SelectField, TextField, useSchemaForm } from "@/components/admin/form-kit";
import { utcToZonedLocal, zonedLocalToUtc } from "@/shared/zoned-time";
import { FileField, LocalDateTimeField, SubmitRow, useFollowZone } from "./form-parts";
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
  const [openedAt] = useState(() => Date.now());
  const initial: V = { compressorId: first ? String(first.id) : "", changedAt: first ? utcToZonedLocal(openedAt, first.timeZone) : "", hourMeterH: "", lot: "", note: "" };
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
  useFollowZone(form, "changedAt", unitOf(form.values)?.timeZone);
  return (
    <form
      id={form.id}
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
        <LocalDateTimeField form={form} name="changedAt" label="Changed at" />
        <TextField form={form} name="hourMeterH" label="Hour meter" unit="h" numeric />
        <TextField form={form} name="lot" label="Cartridge lot number" />
      </div>
      <TextField form={form} name="note" label="Note" />
      <FileField form={form} name="photo" label="Photo (optional)" resetKey={fileKey} onFile={setFile} />
      <SubmitRow pending={form.pending} formError={form.formError} done={done ? "Cartridge change logged; the count starts again." : null} label="Log change" />
    </form>
  );
}
