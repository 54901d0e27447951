"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { SelectField, TextField, useSchemaForm } from "@/components/admin/form-kit";
import { utcToZonedLocal, zonedLocalToUtc } from "@/components/events/zoned-time";
import { attachmentAccept } from "@/shared/attachment-schema";
import { postRecord } from "./post-record";
import type { AirTestVerdict } from "@/shared/air-standards";
import { airTestInputSchema, waterUnitLabels, waterUnits } from "@/shared/air-quality-schema";
import { airStandardLabels, type AirStandard } from "@/shared/air-standards";

export type UnitChoice = { id: number; name: string; siteName: string; timeZone: string; standard: AirStandard };

type V = {
  compressorId: string;
  sampledAt: string;
  samplePoint: string;
  fillBar: string;
  laboratory: string;
  certificateNo: string;
  oxygenPct: string;
  co2Ppm: string;
  coPpm: string;
  oilMgM3: string;
  waterValue: string;
  waterUnit: string;
  hydrocarbonsPpm: string;
  odourOk: string;
  note: string;
};

const numOrNull = (s: string) => (s.trim() === "" ? null : Number(s.replace(",", ".")));

export function AirTestForm({ units }: { units: UnitChoice[] }) {
  const router = useRouter();
  const [done, setDone] = useState<string | null>(null);
  const [file, setFile] = useState<File | null>(null);
  const [fileKey, setFileKey] = useState(0);
  const first = units[0];
  const initial: V = {
    compressorId: first ? String(first.id) : "",
    sampledAt: first ? utcToZonedLocal(Date.now(), first.timeZone) : "",
    samplePoint: "",
    fillBar: "300",
    laboratory: "",
    certificateNo: "",
    oxygenPct: "",
    co2Ppm: "",
    coPpm: "",
    oilMgM3: "",
    waterValue: "",
    waterUnit: "mg/m3",
    hydrocarbonsPpm: "",
    odourOk: "true",
    note: "",
  };
  const unitOf = (v: V) => units.find((u) => String(u.id) === v.compressorId);
  const form = useSchemaForm<V>({
    schema: airTestInputSchema,
    initial,
    toInput: (v) => ({
      compressorId: Number(v.compressorId),
      sampledAt: unitOf(v) ? (zonedLocalToUtc(v.sampledAt, unitOf(v)!.timeZone) ?? undefined) : undefined,
      samplePoint: v.samplePoint,
      fillBar: numOrNull(v.fillBar) ?? undefined,
      laboratory: v.laboratory,
      certificateNo: v.certificateNo,
      oxygenPct: numOrNull(v.oxygenPct),
      co2Ppm: numOrNull(v.co2Ppm),
      coPpm: numOrNull(v.coPpm),
      oilMgM3: numOrNull(v.oilMgM3),
      waterValue: numOrNull(v.waterValue),
      waterUnit: v.waterUnit,
      hydrocarbonsPpm: numOrNull(v.hydrocarbonsPpm),
      odourOk: v.odourOk === "" ? null : v.odourOk === "true",
      note: v.note,
    }),
  });
  const unit = unitOf(form.values);
  return (
    <form
      ref={form.formRef}
      noValidate
      aria-labelledby={`${form.id}-h`}
      className="space-y-3 rounded border border-line bg-raised p-4"
      onSubmit={async (e) => {
        e.preventDefault();
        const r = await form.submit((input) => postRecord<{ id: number; passed: boolean; verdict: AirTestVerdict }>("/api/air-quality/tests", input, file));
        if (r) {
          setDone(r.passed ? `Recorded: passed ${airStandardLabels[r.verdict.standard]}.` : `Recorded: FAILED ${airStandardLabels[r.verdict.standard]}. A critical alarm was raised.`);
          form.reset(initial);
          setFile(null);
          setFileKey((k) => k + 1);
          router.refresh();
        }
      }}
    >
      <h2 id={`${form.id}-h`} className="text-lg font-semibold">
        Record an air test
      </h2>
      <div className="grid gap-3 sm:grid-cols-3">
        <SelectField form={form} name="compressorId" label="Compressor" options={units.map((u) => ({ value: String(u.id), label: `${u.name} (${u.siteName})` }))} />
        <div>
          <label htmlFor={form.fieldId("sampledAt")} className="block text-xs font-semibold text-muted">
            Sampled at ({unit?.timeZone ?? "site time"})
          </label>
          <input
            id={form.fieldId("sampledAt")}
            type="datetime-local"
            value={form.values.sampledAt}
            onChange={(e) => form.set("sampledAt", e.target.value)}
            aria-invalid={form.errorOf("sampledAt") ? true : undefined}
            aria-describedby={form.errorOf("sampledAt") ? `${form.fieldId("sampledAt")}-error` : undefined}
            className="mt-0.5 w-full rounded border border-line bg-white px-2 py-1 text-sm"
          />
          {form.errorOf("sampledAt") && (
            <p id={`${form.fieldId("sampledAt")}-error`} className="mt-0.5 border-l-4 border-ink pl-1.5 text-xs font-semibold" data-field-error="">
              {form.errorOf("sampledAt")}
            </p>
          )}
        </div>
        <TextField form={form} name="samplePoint" label="Sample point" placeholder="e.g. fill panel whip 1" />
        <TextField form={form} name="fillBar" label="Fill pressure" unit="bar" numeric />
        <TextField form={form} name="laboratory" label="Laboratory" />
        <TextField form={form} name="certificateNo" label="Certificate number" />
      </div>
      <p className="text-xs text-muted">
        Judged against {unit ? airStandardLabels[unit.standard] : "the site's standard"} (chosen per site). Leave a result empty if it was not measured.
      </p>
      <div className="grid gap-3 sm:grid-cols-4">
        <TextField form={form} name="oxygenPct" label="Oxygen" unit="% v/v" numeric />
        <TextField form={form} name="co2Ppm" label="Carbon dioxide" unit="ppm" numeric />
        <TextField form={form} name="coPpm" label="Carbon monoxide" unit="ppm" numeric />
        <TextField form={form} name="oilMgM3" label="Oil (mist and vapour)" unit="mg/m³" numeric />
        <TextField form={form} name="waterValue" label="Water" numeric />
        <SelectField form={form} name="waterUnit" label="Water unit" options={waterUnits.map((u) => ({ value: u, label: waterUnitLabels[u] }))} />
        <TextField form={form} name="hydrocarbonsPpm" label="Hydrocarbons (as methane)" unit="ppm" numeric />
        <SelectField
          form={form}
          name="odourOk"
          label="Odour and taste"
          options={[
            { value: "true", label: "None noticed" },
            { value: "false", label: "Noticed" },
            { value: "", label: "Not assessed" },
          ]}
        />
      </div>
      <TextField form={form} name="note" label="Note" />
      <div>
        <label htmlFor={`${form.id}-certificate`} className="block text-xs font-semibold text-muted">
          Laboratory certificate (PDF or image, at most 20 MB)
        </label>
        <input
          key={fileKey}
          id={`${form.id}-certificate`}
          name="certificate"
          type="file"
          accept={attachmentAccept}
          onChange={(e) => setFile(e.target.files?.[0] ?? null)}
          aria-invalid={form.errorOf("certificate" as keyof V & string) ? true : undefined}
          aria-describedby={form.errorOf("certificate" as keyof V & string) ? `${form.id}-certificate-error` : undefined}
          className="mt-0.5 text-sm"
        />
        {form.errorOf("certificate" as keyof V & string) && (
          <p id={`${form.id}-certificate-error`} className="mt-0.5 border-l-4 border-ink pl-1.5 text-xs font-semibold" data-field-error="">
            {form.errorOf("certificate" as keyof V & string)}
          </p>
        )}
      </div>
      {form.formError && (
        <p role="alert" className="font-semibold">
          {form.formError}
        </p>
      )}
      {done && <p role="status">{done}</p>}
      <button type="submit" disabled={form.pending} className="rounded border border-ink bg-ink px-3 py-1 text-sm font-semibold text-white disabled:opacity-50">
        {form.pending ? "Saving…" : "Save test record"}
      </button>
    </form>
  );
}
