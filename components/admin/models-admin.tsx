"use client";

import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { createCompressorModel, updateCompressorModel } from "@/lib/actions/admin-models";
import { DataTable, type DataColumn } from "@/components/data-table";
import { adminQueries } from "@/components/queries/admin";
import { FREE_AIR_BASIS, FREE_AIR_BASIS_SHORT } from "@/shared/air";
import {
  compressorModelInputSchema,
  compressorModelUpdateSchema,
  type CompressorModelDto,
} from "@/shared/compressor-schema";
import { MAX_STAGES } from "@/shared/telemetry";
import { buttonClass, FormActions, FormAlert, FormPanel, SelectField, StatusLine, TextField, useSchemaForm } from "./form-kit";
import { useAdminRefresh } from "./use-admin-refresh";

type Panel = { kind: "create" } | { kind: "edit"; model: CompressorModelDto } | null;

export function ModelsAdmin() {
  const models = useQuery(adminQueries.models());
  const compressors = useQuery(adminQueries.compressors());
  const refresh = useAdminRefresh();
  const [panel, setPanel] = useState<Panel>(null);
  const [status, setStatus] = useState<string | null>(null);

  const counts = new Map<number, number>();
  for (const c of compressors.data ?? []) counts.set(c.modelId, (counts.get(c.modelId) ?? 0) + 1);

  const columns: DataColumn<CompressorModelDto>[] = [
    { id: "name", header: "Name", sortValue: (m) => m.name, cell: (m) => m.name },
    { id: "maker", header: "Maker", sortValue: (m) => m.maker, cell: (m) => m.maker || <span className="text-muted">—</span> },
    { id: "stages", header: "Stages", numeric: true, sortValue: (m) => m.stages, cell: (m) => m.stages },
    {
      id: "delivery",
      header: "Rated delivery",
      numeric: true,
      sortValue: (m) => m.ratedDeliveryLpm,
      cell: (m) => `${m.ratedDeliveryLpm} l/min (${FREE_AIR_BASIS_SHORT})`,
    },
    {
      id: "pressure",
      header: "Rated pressure",
      numeric: true,
      sortValue: (m) => m.ratedPressureBar,
      cell: (m) => `${m.ratedPressureBar} bar`,
    },
    { id: "units", header: "In use", numeric: true, sortValue: (m) => counts.get(m.id) ?? 0, cell: (m) => counts.get(m.id) ?? 0 },
    {
      id: "actions",
      header: <span className="sr-only">Actions</span>,
      cell: (m) => (
        <div className="flex justify-end">
          <button
            type="button"
            className={buttonClass.small}
            aria-label={`Edit model ${m.name}`}
            onClick={() => {
              setStatus(null);
              setPanel({ kind: "edit", model: m });
            }}
          >
            Edit
          </button>
        </div>
      ),
    },
  ];

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2">
        <h1 className="text-xl font-semibold">Compressor models</h1>
        <button
          type="button"
          className={`${buttonClass.primary} ml-auto`}
          onClick={() => {
            setStatus(null);
            setPanel({ kind: "create" });
          }}
        >
          Add a model
        </button>
      </div>
      {panel && (
        <ModelForm
          key={panel.kind === "edit" ? panel.model.id : "new"}
          model={panel.kind === "edit" ? panel.model : null}
          onCancel={() => setPanel(null)}
          onDone={async (m, created) => {
            setPanel(null);
            setStatus(created ? `Added model ${m.name}.` : `Saved model ${m.name}.`);
            await refresh();
          }}
        />
      )}
      <StatusLine message={status} />
      {models.error && <p role="alert">Could not load models: {models.error.message}</p>}
      <DataTable
        data-testid="models-table"
        caption="Compressor models"
        rows={models.data ?? []}
        columns={columns}
        rowKey={(m) => m.id}
        initialSort={{ columnId: "name", direction: "asc" }}
        loading={models.isPending}
        emptyText="No models yet. Add one before adding compressors."
        rowProps={() => ({ "data-testid": "model-row" })}
      />
    </div>
  );
}

const stageOptions = Array.from({ length: MAX_STAGES }, (_, i) => ({ value: String(i + 1), label: String(i + 1) }));

function ModelForm({
  model,
  onDone,
  onCancel,
}: {
  model: CompressorModelDto | null;
  onDone: (m: CompressorModelDto, created: boolean) => void;
  onCancel: () => void;
}) {
  const form = useSchemaForm({
    schema: model ? compressorModelUpdateSchema : compressorModelInputSchema,
    initial: {
      name: model?.name ?? "",
      maker: model?.maker ?? "",
      stages: model ? String(model.stages) : "",
      ratedDeliveryLpm: model ? String(model.ratedDeliveryLpm) : "",
      ratedPressureBar: model ? String(model.ratedPressureBar) : "",
    },
    toInput: (v) => (model ? { ...v, id: model.id } : v),
  });
  const title = model ? `Edit model ${model.name}` : "Add a compressor model";
  return (
    <FormPanel title={title}>
      <form
        id={form.id}
        noValidate
        aria-label={title}
        className="grid gap-3 md:grid-cols-3"
        onSubmit={async (e) => {
          e.preventDefault();
          const saved = await form.submit(model ? updateCompressorModel : createCompressorModel);
          if (saved) onDone(saved, !model);
        }}
      >
        <TextField form={form} name="name" label="Name" maxLength={120} />
        <TextField form={form} name="maker" label="Maker" maxLength={120} hint="Optional." />
        <SelectField form={form} name="stages" label="Stages" placeholder="Choose…" options={stageOptions} />
        <TextField form={form} name="ratedDeliveryLpm" label="Rated delivery" unit="l/min" numeric hint={`Free air delivered, litres per minute: ${FREE_AIR_BASIS}.`} />
        <TextField
          form={form}
          name="ratedPressureBar"
          label="Rated pressure"
          unit="bar"
          numeric
          hint="Maximum working pressure; no compressor of this model may stop above it."
        />
        <div className="space-y-2 md:col-span-3">
          <FormAlert message={form.formError} />
          <FormActions pending={form.pending} submitLabel={model ? "Save model" : "Add model"} onCancel={onCancel} />
        </div>
      </form>
    </FormPanel>
  );
}
