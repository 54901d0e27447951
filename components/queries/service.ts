import { queryOptions } from "@tanstack/react-query";
import type { ServiceOverviewDto } from "@/shared/service-schema";
import { HttpError } from "./live";

export type ServiceFilter = { site?: number; compressor?: number; q?: string };

export const serviceKey = ["service"] as const;

export function serviceQueryString(f: ServiceFilter): string {
  const p = new URLSearchParams();
  if (f.site) p.set("site", String(f.site));
  if (f.compressor) p.set("compressor", String(f.compressor));
  if (f.q) p.set("q", f.q);
  return p.toString();
}

export const serviceQueries = {
  /** GET /api/service: due status, log and windows in the person's sites; refreshed every half minute. */
  overview: (f: ServiceFilter) =>
    queryOptions({
      queryKey: [...serviceKey, "overview", serviceQueryString(f)],
      queryFn: async () => {
        const url = `/api/service?${serviceQueryString(f)}`;
        const res = await fetch(url, { headers: { accept: "application/json" }, cache: "no-store", credentials: "same-origin" });
        if (!res.ok) {
          const body = (await res.json().catch(() => null)) as { error?: string } | null;
          throw new HttpError(res.status, body?.error ?? `${url} answered ${res.status}`);
        }
        return (await res.json()) as ServiceOverviewDto;
      },
      refetchInterval: 30_000,
    }),
};
