import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import type { ComparisonReport, MonthlyReport } from "@/shared/availability";
import { HttpError } from "./live";

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, cache: "no-store", credentials: "same-origin" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new HttpError(res.status, body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

const qs = (month: string, scope: string) => `month=${encodeURIComponent(month)}&scope=${encodeURIComponent(scope)}`;

/** Every report query key starts with this. */
export const reportsKey = ["reports"] as const;

export const reportQueries = {
  /** The monthly report of one scope (fleet, site-<id>, compressor-<id>). A finished month does not change often. */
  report: (month: string, scope: string) =>
    queryOptions({
      queryKey: [...reportsKey, "month", month, scope],
      queryFn: () => getJson<MonthlyReport>(`/api/reports?${qs(month, scope)}`),
      staleTime: 5 * 60_000,
      placeholderData: keepPreviousData,
    }),
  /** The 12 months ending with `month`, same scope. */
  comparison: (month: string, scope: string) =>
    queryOptions({
      queryKey: [...reportsKey, "comparison", month, scope],
      queryFn: () => getJson<ComparisonReport>(`/api/reports/comparison?${qs(month, scope)}`),
      staleTime: 5 * 60_000,
      placeholderData: keepPreviousData,
    }),
};
