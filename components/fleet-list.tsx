"use client";

import { useQuery } from "@tanstack/react-query";
import { formatPressure } from "@/shared/units";
import { fleetQueries } from "./queries/fleet";
import { useUnits } from "./use-units";

export function FleetList() {
  const units = useUnits();
  const sites = useQuery(fleetQueries.sites());
  const compressors = useQuery(fleetQueries.compressors());
  if (sites.error || compressors.error) return <p role="alert">{String(sites.error ?? compressors.error)}</p>;
  return (
    <div className="grid gap-4 lg:grid-cols-3">
      {(sites.data ?? []).map((site) => (
        <section key={site.id} className="rounded border border-line bg-panel p-3" data-testid="site">
          <h2 className="font-semibold">{site.name}</h2>
          <p className="text-xs text-muted">{site.timeZone}</p>
          <ul className="mt-2 space-y-1">
            {(compressors.data ?? [])
              .filter((c) => c.siteId === site.id)
              .map((c) => (
                <li key={c.id} className="flex justify-between rounded bg-raised px-2 py-1 text-sm">
                  <span>{c.name}</span>
                  <span className="num">stop {formatPressure(c.stopPressureBar, units.pressureUnit)}</span>
                </li>
              ))}
          </ul>
        </section>
      ))}
    </div>
  );
}
