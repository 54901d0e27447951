import { asc, eq, inArray } from "drizzle-orm";
import type { SiteDto, SiteInput } from "@/shared/site-schema";
import type { Db } from "./client";
import { sites } from "./schema";

const columns = { id: sites.id, name: sites.name, code: sites.code, timeZone: sites.timeZone, address: sites.address };

/** siteIds null means every site. */
export function listSites(db: Db, siteIds: number[] | null): SiteDto[] {
  const q = db.select(columns).from(sites);
  return (siteIds ? q.where(inArray(sites.id, siteIds)) : q).orderBy(asc(sites.name)).all();
}

export function getSite(db: Db, id: number): SiteDto | null {
  return db.select(columns).from(sites).where(eq(sites.id, id)).get() ?? null;
}

export function createSite(db: Db, input: SiteInput, now = Date.now()): SiteDto {
  return db.insert(sites).values({ ...input, createdAt: now }).returning(columns).get();
}

export function updateSite(db: Db, id: number, input: SiteInput): SiteDto | null {
  return db.update(sites).set(input).where(eq(sites.id, id)).returning(columns).get() ?? null;
}
