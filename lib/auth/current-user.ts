import { getServerSession } from "next-auth";
import { headers } from "next/headers";
import { forbidden, redirect } from "next/navigation";
import { cache } from "react";
import { getDb } from "@/db/client";
import { PAGE_PATH_HEADER, signInUrl } from "@/shared/callback-url";
import { can, denialReason, type Permission } from "@/shared/roles";
import { authOptions } from "./options";
import { resolveSession, type CurrentUser } from "./session-check";

export type { CurrentUser };

export class AccessError extends Error {
  constructor(
    readonly status: 401 | 403,
    message: string,
  ) {
    super(message);
  }
}

/**
 * The signed-in person, checked against the database once per request: React's cache() shares the answer between a
 * layout and its page within one server render (route handlers and server actions call it once anyway).
 */
export const currentUser = cache(async (): Promise<CurrentUser | null> => {
  const session = await getServerSession(authOptions);
  return session ? resolveSession(getDb(), { uid: session.uid, sid: session.sid }) : null;
});

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

/** For server components: redirects to sign-in (and back to this page afterwards), or renders the 403 page. */
export async function pageUser(permission?: Permission): Promise<CurrentUser> {
  const user = await currentUser();
  if (!user) redirect(signInUrl((await headers()).get(PAGE_PATH_HEADER)));
  if (permission && !can(user.role, permission)) forbidden();
  return user;
}

export function inScope(user: Pick<CurrentUser, "siteIds">, siteId: number): boolean {
  return user.siteIds === null || user.siteIds.includes(siteId);
}
