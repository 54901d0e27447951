import { queryOptions } from "@tanstack/react-query";
import type { CompressorDto } from "@/shared/compressor-schema";
import type { SiteDto } from "@/shared/site-schema";

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new Error(body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

export const fleetQueries = {
  sites: () =>
    queryOptions({
      queryKey: ["sites"],
      queryFn: () => getJson<{ sites: SiteDto[] }>("/api/sites").then((r) => r.sites),
    }),
  compressors: () =>
    queryOptions({
      queryKey: ["compressors"],
      queryFn: () => getJson<{ compressors: CompressorDto[] }>("/api/compressors").then((r) => r.compressors),
    }),
};
