"use client";

import { useRouter } from "next/navigation";
import { useState, type ReactNode } from "react";
import { SelectField, TextField, useSchemaForm, type FormApi } from "@/components/admin/form-kit";
import type { ActionResult } from "@/lib/api/action";
import { savePurifierRatingAction, saveSiteAirSettingsAction } from "@/lib/actions/air-quality";
import { purifierRatingInputSchema, siteAirSettingsInputSchema } from "@/shared/air-quality-schema";
import { airStandardLabels, airStandards, type AirStandard } from "@/shared/air-standards";

export type SiteSetting = { siteId: number; siteName: string; standard: AirStandard; intervalDays: number };
export type ModelRating = {
  modelId: number;
  modelName: string;
  backPressureBar: number;
  rating: { kind: "water-g" | "air-m3"; value: number; refBar: number; refC: number; advisoryPct: number } | null;
};

type Action = (input: unknown) => Promise<ActionResult<unknown>>;

/** One line of settings: its fields, Save, and what became of it. */
function SettingsLine<V extends Record<string, unknown>>({ form, action, children }: { form: FormApi<V>; action: Action; children: ReactNode }) {
  const router = useRouter();
  const [saved, setSaved] = useState(false);
  return (
    <form
      id={form.id}
      noValidate
      className="flex flex-wrap items-end gap-3"
      onSubmit={async (e) => {
        e.preventDefault();
        if (await form.submit(action)) {
          setSaved(true);
          router.refresh();
        }
      }}
    >
      {children}
      <button type="submit" className="rounded border border-line px-2 py-1 text-sm">
        Save
      </button>
      {form.formError && <span role="alert">{form.formError}</span>}
      {saved && <span role="status">Saved</span>}
    </form>
  );
}

function SiteForm({ s }: { s: SiteSetting }) {
  const form = useSchemaForm({
    schema: siteAirSettingsInputSchema,
    initial: { standard: s.standard as string, intervalDays: String(s.intervalDays) },
    toInput: (v) => ({ siteId: s.siteId, standard: v.standard, intervalDays: Number(v.intervalDays) }),
  });
  return (
    <SettingsLine form={form} action={saveSiteAirSettingsAction}>
      <span className="w-56 font-semibold">{s.siteName}</span>
      <SelectField form={form} name="standard" label="Standard" options={airStandards.map((x) => ({ value: x, label: airStandardLabels[x] }))} />
      <TextField form={form} name="intervalDays" label="Test interval" unit="days" numeric />
    </SettingsLine>
  );
}

/** A model's rating (with its back-pressure valve), or a compressor's override of it (empty capacity: no override). */
export function RatingForm({ m, scopeType = "model" }: { m: ModelRating; scopeType?: "model" | "compressor" }) {
  const r = m.rating;
  const form = useSchemaForm({
    schema: purifierRatingInputSchema,
    initial: {
      kind: r?.kind ?? "water-g",
      value: r ? String(r.value) : "",
      refBar: String(r?.refBar ?? 200),
      refC: String(r?.refC ?? 20),
      advisoryPct: String(r?.advisoryPct ?? 80),
      backPressureBar: String(m.backPressureBar),
    },
    toInput: (v) => ({
      scopeType,
      scopeId: m.modelId,
      rating: v.value.trim() === "" ? null : { kind: v.kind, value: Number(v.value), refBar: Number(v.refBar), refC: Number(v.refC), advisoryPct: Number(v.advisoryPct) },
      ...(scopeType === "model" ? { backPressureBar: Number(v.backPressureBar) } : {}),
    }),
  });
  return (
    <SettingsLine form={form} action={savePurifierRatingAction}>
      <span className="w-56 font-semibold">{m.modelName}</span>
      <SelectField
        form={form}
        name="kind"
        label="Rated as"
        options={[
          { value: "water-g", label: "grams of water" },
          { value: "air-m3", label: "m³ of free air" },
        ]}
      />
      <TextField form={form} name="value" label="Capacity" numeric />
      <TextField form={form} name="refBar" label="at" unit="bar" numeric />
      <TextField form={form} name="refC" label="and" unit="°C" numeric />
      <TextField form={form} name="advisoryPct" label="Advisory at" unit="%" numeric />
      {scopeType === "model" && <TextField form={form} name="backPressureBar" label="Back-pressure valve" unit="bar" numeric />}
    </SettingsLine>
  );
}

export function AirSettingsAdmin({ sites, models }: { sites: SiteSetting[]; models: ModelRating[] }) {
  return (
    <section aria-labelledby="aq-admin-h" className="space-y-3 rounded border border-line bg-raised p-4">
      <h2 id="aq-admin-h" className="text-lg font-semibold">
        Settings (administrators)
      </h2>
      <h3 className="font-semibold">Sites: standard and test interval</h3>
      {sites.map((s) => (
        <SiteForm key={s.siteId} s={s} />
      ))}
      <h3 className="font-semibold">Models: purifier cartridge rating and back-pressure valve</h3>
      <p className="text-xs text-muted">
        The supplier&apos;s rating: grams of water, or free air at a pressure and purifier temperature. A compressor can override its model&apos;s rating.
      </p>
      {models.map((m) => (
        <RatingForm key={m.modelId} m={m} />
      ))}
    </section>
  );
}
