import { inScope, type CurrentUser } from "@/lib/auth/current-user";

/** The sites to list: the person's scope, narrowed to one site when asked (nothing when that site is outside it). */
export function alarmSiteIds(user: CurrentUser, site: number | undefined): number[] | null {
  if (site === undefined) return user.siteIds;
  return inScope(user, site) ? [site] : [];
}
