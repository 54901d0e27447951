import { queryOptions } from "@tanstack/react-query";
import type { CompressorDto, CompressorModelDto } from "@/shared/compressor-schema";
import type { SiteDto } from "@/shared/site-schema";
import type { UserDto } from "@/shared/user-schema";

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, cache: "no-store" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new Error(body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}

/** Every admin query key starts with this, so one invalidation can refresh them all. */
export const adminKey = ["admin"] as const;

export const adminQueries = {
  users: () =>
    queryOptions({
      queryKey: [...adminKey, "users"],
      queryFn: () => getJson<{ users: UserDto[] }>("/api/admin/users").then((r) => r.users),
    }),
  sites: () =>
    queryOptions({
      queryKey: [...adminKey, "sites"],
      queryFn: () => getJson<{ sites: SiteDto[] }>("/api/admin/sites").then((r) => r.sites),
    }),
  models: () =>
    queryOptions({
      queryKey: [...adminKey, "models"],
      queryFn: () => getJson<{ models: CompressorModelDto[] }>("/api/admin/models").then((r) => r.models),
    }),
  compressors: () =>
    queryOptions({
      queryKey: [...adminKey, "compressors"],
      queryFn: () => getJson<{ compressors: CompressorDto[] }>("/api/admin/compressors").then((r) => r.compressors),
    }),
};
