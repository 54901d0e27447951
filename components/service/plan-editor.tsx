"use client";

import { useId, useState } from "react";
import { removeServiceTask, saveServiceLead, saveServiceTask } from "@/lib/actions/service";
import type { ServiceOverviewDto, ServiceTaskDto } from "@/shared/service-schema";


const sourceWords: Record<ServiceTaskDto["source"], string> = { model: "from the model", override: "override", compressor: "this compressor only" };
const f = "w-full rounded border border-line bg-white px-1 py-0.5 text-sm";

/**
 * Service plans: a model's tasks are the template; a compressor's row with the same code overrides it (or switches it
 * off), like threshold overrides. Changes are audited and take effect on the due list and the alarms at once.
 */
export function PlanEditor({ data, onChanged }: { data: ServiceOverviewDto; onChanged: () => void }) {
  const id = useId();
  const [scope, setScope] = useState<string>(() => (data.compressors[0] ? `compressor-${data.compressors[0].id}` : data.plans.models[0] ? `model-${data.plans.models[0].id}` : ""));
  const [kind, rawId] = scope.split("-") as ["model" | "compressor", string];
  const scopeId = Number(rawId);
  const tasks: ServiceTaskDto[] = (kind === "model" ? data.plans.models.find((m) => m.id === scopeId)?.tasks : data.plans.compressors[String(scopeId)]) ?? [];
  return (
    <section className="space-y-2 rounded border border-line bg-raised p-4" aria-labelledby={`${id}-h`} data-testid="plan-editor">
      <h2 id={`${id}-h`} className="text-lg font-semibold">
        Service plans
      </h2>
      <p className="text-sm text-muted">
        Copy the intervals from the maker&apos;s manual. A compressor inherits its model&apos;s tasks; a change made for one compressor is an override.
      </p>
      <label className="text-xs font-semibold text-muted" htmlFor={`${id}-s`}>
        Plan of
        <select id={`${id}-s`} value={scope} onChange={(e) => setScope(e.target.value)} className="ml-2 rounded border border-line bg-white px-2 py-1 text-sm text-ink">
          <optgroup label="Compressors">
            {data.compressors.map((c) => (
              <option key={c.id} value={`compressor-${c.id}`}>
                {c.name}
              </option>
            ))}
          </optgroup>
          {data.plans.models.length > 0 && (
            <optgroup label="Models (every compressor of the model)">
              {data.plans.models.map((m) => (
                <option key={m.id} value={`model-${m.id}`}>
                  {m.name}
                </option>
              ))}
            </optgroup>
          )}
        </select>
      </label>
      <table className="w-full text-sm">
        <thead className="text-left text-xs text-muted">
          <tr>
            <th scope="col">Code</th>
            <th scope="col">Task</th>
            <th scope="col">Every (h)</th>
            <th scope="col">Every (months)</th>
            <th scope="col">On</th>
            <th scope="col">Source</th>
            <th scope="col">
              <span className="sr-only">Actions</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {tasks.map((t) => (
            <TaskRow key={`${scope}-${t.code}-${t.source}`} scopeType={kind} scopeId={scopeId} task={t} onChanged={onChanged} />
          ))}
          <TaskRow key={`${scope}-new`} scopeType={kind} scopeId={scopeId} task={null} onChanged={onChanged} />
        </tbody>
      </table>
      <LeadForm data={data} onChanged={onChanged} />
    </section>
  );
}

function TaskRow({ scopeType, scopeId, task, onChanged }: { scopeType: "model" | "compressor"; scopeId: number; task: ServiceTaskDto | null; onChanged: () => void }) {
  const [code, setCode] = useState(task?.code ?? "");
  const [name, setName] = useState(task?.name ?? "");
  const [hours, setHours] = useState(task?.everyHours == null ? "" : String(task.everyHours));
  const [months, setMonths] = useState(task?.everyMonths == null ? "" : String(task.everyMonths));
  const [enabled, setEnabled] = useState(task?.enabled ?? true);
  const [message, setMessage] = useState<string | null>(null);
  const label = task ? task.name : "new task";
  const save = async () => {
    const r = await saveServiceTask({
      scopeType,
      scopeId,
      task: { code: code.trim(), name, everyHours: hours.trim() === "" ? null : Number(hours), everyMonths: months.trim() === "" ? null : Number(months), enabled, note: "" },
    });
    if (r.ok) {
      setMessage("Saved");
      onChanged();
    } else setMessage([r.error, ...Object.values(r.fieldErrors ?? {}).flat()].join(" "));
  };
  const remove = async () => {
    const r = await removeServiceTask({ scopeType, scopeId, code: task!.code });
    if (r.ok) onChanged();
    else setMessage(r.error);
  };
  const removable = task && (scopeType === "model" || task.source !== "model");
  return (
    <tr className="border-t border-line align-top">
      <td>{task ? <span className="num">{task.code}</span> : <input aria-label="Code of the new task" value={code} onChange={(e) => setCode(e.target.value)} className={f} placeholder="e.g. belt-check" />}</td>
      <td>
        <input aria-label={`Name of ${label}`} value={name} onChange={(e) => setName(e.target.value)} className={f} />
      </td>
      <td>
        <input aria-label={`Run hours of ${label}`} inputMode="decimal" value={hours} onChange={(e) => setHours(e.target.value)} className={`${f} num`} />
      </td>
      <td>
        <input aria-label={`Months of ${label}`} inputMode="numeric" value={months} onChange={(e) => setMonths(e.target.value)} className={`${f} num`} />
      </td>
      <td>
        <input type="checkbox" aria-label={`${label} switched on`} checked={enabled} onChange={(e) => setEnabled(e.target.checked)} />
      </td>
      <td className="text-xs text-muted">{task ? (scopeType === "model" ? "model" : sourceWords[task.source]) : ""}</td>
      <td className="whitespace-nowrap">
        <button type="button" onClick={save} className="rounded border border-line px-2 py-0.5 text-xs font-semibold">
          {task ? "Save" : "Add"}
        </button>
        {removable && (
          <button type="button" onClick={remove} className="ml-1 rounded border border-line px-2 py-0.5 text-xs">
            {scopeType === "model" ? "Remove" : "Back to model"}
          </button>
        )}
        {message && (
          <span className="ml-1 text-xs" role="status">
            {message}
          </span>
        )}
      </td>
    </tr>
  );
}

function LeadForm({ data, onChanged }: { data: ServiceOverviewDto; onChanged: () => void }) {
  const id = useId();
  const [hours, setHours] = useState(String(data.lead.leadHours));
  const [days, setDays] = useState(String(data.lead.leadDays));
  const [message, setMessage] = useState<string | null>(null);
  return (
    <form
      className="flex flex-wrap items-end gap-2 border-t border-line pt-2"
      onSubmit={async (e) => {
        e.preventDefault();
        const r = await saveServiceLead({ leadHours: Number(hours), leadDays: Number(days) });
        setMessage(r.ok ? "Saved" : [r.error, ...Object.values(r.fieldErrors ?? {}).flat()].join(" "));
        if (r.ok) onChanged();
      }}
    >
      <span className="text-sm">A task counts as coming due (advisory) within</span>
      <label className="text-xs text-muted" htmlFor={`${id}-h`}>
        run hours
        <input id={`${id}-h`} value={hours} onChange={(e) => setHours(e.target.value)} className={`${f} num w-20`} />
      </label>
      <label className="text-xs text-muted" htmlFor={`${id}-d`}>
        or days
        <input id={`${id}-d`} value={days} onChange={(e) => setDays(e.target.value)} className={`${f} num w-20`} />
      </label>
      <button type="submit" className="rounded border border-line px-2 py-0.5 text-xs font-semibold">
        Save lead
      </button>
      {message && (
        <span className="text-xs" role="status">
          {message}
        </span>
      )}
    </form>
  );
}
