import { getServerSession } from "next-auth";
import { forbidden, redirect } from "next/navigation";
import { getDb } from "@/db/client";
import { findSession, touchSession } from "@/db/sessions";
import { findUserById, siteIdsOfUser } from "@/db/users";
import { can, denialReason, type Permission, type Role } from "@/shared/roles";
import type { UnitPreference } from "@/shared/units";
import { authOptions } from "./options";
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

export class AccessError extends Error {
  constructor(
    readonly status: 401 | 403,
    message: string,
  ) {
    super(message);
  }
}

const TOUCH_EVERY_MS = 60_000;

/** The signed-in person, checked against the database on every call: disabled, revoked or expired sessions are refused. */
export async function currentUser(): Promise<CurrentUser | null> {
  const session = await getServerSession(authOptions);
  if (!session?.uid || !session.sid) return null;
  const db = getDb();
  const row = findSession(db, session.sid);
  const now = Date.now();
  const { idleMs, absoluteMs } = sessionPolicy();
  if (!row || row.userId !== session.uid || row.revokedAt != null) return null;
  if (now - row.lastSeenAt > idleMs || now - row.createdAt > absoluteMs) return null;
  const user = findUserById(db, row.userId);
  if (!user || user.disabled) return null;
  if (now - row.lastSeenAt > TOUCH_EVERY_MS) touchSession(db, row.id, now);
  const siteIds = siteIdsOfUser(db, user.id);
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    siteIds: siteIds.length ? siteIds : null,
    units: { pressureUnit: user.pressureUnit, temperatureUnit: user.temperatureUnit },
    sessionId: row.id,
  };
}

export async function requireUser(): Promise<CurrentUser> {
  const user = await currentUser();
  if (!user) throw new AccessError(401, "Sign in to continue.");
  return user;
}

export async function requirePermission(permission: Permission): Promise<CurrentUser> {
  const user = await requireUser();
  if (!can(user.role, permission)) throw new AccessError(403, denialReason(permission));
  return user;
}

/** For server components: redirects to sign-in, or renders the 403 page. */
export async function pageUser(permission?: Permission): Promise<CurrentUser> {
  const user = await currentUser();
  if (!user) redirect("/login");
  if (permission && !can(user.role, permission)) forbidden();
  return user;
}

export function inScope(user: Pick<CurrentUser, "siteIds">, siteId: number): boolean {
  return user.siteIds === null || user.siteIds.includes(siteId);
}
