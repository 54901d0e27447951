import type { Db } from "@/db/client";
import { findSession, touchSession } from "@/db/sessions";
import { findUserById, siteScopeOf } from "@/db/users";
import type { Role } from "@/shared/roles";
import type { UnitPreference } from "@/shared/units";
import { sessionPolicy } from "./policy";

export type CurrentUser = {
  id: number;
  email: string;
  name: string;
  role: Role;
  /** null: every site. */
  siteIds: number[] | null;
  units: UnitPreference;
  sessionId: string;
};

const TOUCH_EVERY_MS = 60_000;

/**
 * Turns the claims of a session token into the person behind it, or null when the session was revoked,
 * has been idle or open too long, or the account is gone or disabled. Role and scope are read fresh.
 */
export function resolveSession(
  db: Db,
  claims: { uid?: number; sid?: string },
  now = Date.now(),
  policy = sessionPolicy(),
): CurrentUser | null {
  if (!claims.uid || !claims.sid) return null;
  const row = findSession(db, claims.sid);
  if (!row || row.userId !== claims.uid || row.revokedAt != null) return null;
  if (now - row.lastSeenAt > policy.idleMs || now - row.createdAt > policy.absoluteMs) return null;
  const user = findUserById(db, row.userId);
  if (!user || user.disabled) return null;
  if (now - row.lastSeenAt > TOUCH_EVERY_MS) touchSession(db, row.id, now);
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    siteIds: siteScopeOf(db, user),
    units: { pressureUnit: user.pressureUnit, temperatureUnit: user.temperatureUnit },
    sessionId: row.id,
  };
}
