"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import type { ScopeType } from "@/shared/threshold-schema";
import { thresholdQueries } from "../queries/thresholds";
import { SetEditor } from "./set-editor";

export const scopeHref = (scopeType: ScopeType, scopeId: number) => `/thresholds?${scopeType}=${scopeId}`;

/** Templates per model with the compressors under them on the left; the chosen set on the right. */
export function ThresholdsView({ scopeType, scopeId }: { scopeType: ScopeType; scopeId: number }) {
  const overview = useQuery(thresholdQueries.overview());
  const models = overview.data?.models ?? [];
  const current = (t: ScopeType, id: number) => t === scopeType && id === scopeId;
  const link = (t: ScopeType, id: number, text: string, extra: string, testId: string) => (
    <Link
      href={scopeHref(t, id)}
      aria-current={current(t, id) ? "page" : undefined}
      className={`block rounded px-2 py-1 no-underline ${current(t, id) ? "bg-ink text-raised" : "text-ink hover:bg-panel"}`}
      data-testid={testId}
    >
      <span className={t === "model" ? "font-semibold" : ""}>{text}</span>
      <span className={`num ml-1 text-xs ${current(t, id) ? "text-raised" : "text-muted"}`}>{extra}</span>
    </Link>
  );
  return (
    <div className="mx-auto grid max-w-7xl gap-4 lg:grid-cols-[16rem_1fr]">
      <nav aria-label="Threshold sets" className="space-y-3 text-sm">
        <h1 className="text-2xl font-semibold">Thresholds</h1>
        <p className="text-muted" data-testid="thresholds-scope-note">
          These limits raise Airkeep&apos;s own alarms only. They never change the machine&apos;s own trips or settings.
        </p>
        {models.map((m) => (
          <div key={m.id}>
            {link("model", m.id, `${m.name} template`, `${m.limits} limits`, "scope-model")}
            <ul className="ml-3 border-l border-line pl-1">
              {m.compressors.map((c) => (
                <li key={c.id}>
                  {link("compressor", c.id, c.name, c.overrides ? `${c.overrides} own` : "inherits", "scope-compressor")}
                </li>
              ))}
            </ul>
          </div>
        ))}
      </nav>
      <div className="min-w-0">
        <SetEditor key={`${scopeType}:${scopeId}`} scopeType={scopeType} scopeId={scopeId} />
      </div>
    </div>
  );
}
