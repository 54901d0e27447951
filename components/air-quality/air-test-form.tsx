"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { SelectField, TextField, useSchemaForm } from "@/components/admin/form-kit";
import { utcToZonedLocal, zonedLocalToUtc } from "@/shared/zoned-time";
import { FileField, LocalDateTimeField, SubmitRow, useFollowZone } from "./form-parts";
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
  const [openedAt] = useState(() => Date.now());
  const initial: V = {
    compressorId: first ? String(first.id) : "",
    sampledAt: first ? utcToZonedLocal(openedAt, first.timeZone) : "",
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
  useFollowZone(form, "sampledAt", unit?.timeZone);
  return (
    <form
      id={form.id}
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
        <LocalDateTimeField form={form} name="sampledAt" label={`Sampled at (${unit?.timeZone ?? "site time"})`} />
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
      <FileField form={form} name="certificate" label="Laboratory certificate (PDF or image, at most 20 MB)" resetKey={fileKey} onFile={setFile} />
      <SubmitRow pending={form.pending} formError={form.formError} done={done} label="Save test record" />
    </form>
  );
}
