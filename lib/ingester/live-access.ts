import type { Db } from "@/db/client";
import { findSession } from "@/db/sessions";
import { findUserById, siteIdsOfUser } from "@/db/users";
import { sessionPolicy } from "@/lib/auth/policy";
import type { LiveTokenClaims } from "@/lib/live-token";
import { can } from "@/shared/roles";

export type LiveDenial = "link-revoked" | "no-account" | "disabled" | "no-session" | "signed-out" | "idle" | "too-old" | "forbidden";

/** What a live socket may see now: its sites (null: every site), or why it may not stay open. */
export type LiveAccess = { ok: true; siteIds: number[] | null } | { ok: false; reason: LiveDenial };

export type LiveAccessCheck = (claims: LiveTokenClaims, now?: number) => LiveAccess;

type SessionLimits = { idleMs: number; absoluteMs: number };

/**
 * Asked when a live socket opens and at every ping. A display link: until it is revoked, with its own sites. A
 * person: while the account is enabled and may view the board, and the sign-in session the token names is neither
 * signed out, revoked, idle past SESSION_IDLE_MINUTES nor older than SESSION_MAX_MINUTES; with the sites the account
 * has now (as currentUser reads them), not those in the token. The socket itself does not count as use of the
 * session, so a screen left open does not keep an idle session alive.
 */
export function liveAccessCheck(db: Db, limits: SessionLimits = sessionPolicy()): LiveAccessCheck {
  const link = db.$client.prepare("SELECT revoked_at AS revokedAt, site_ids AS siteIds FROM display_links WHERE id = ?");
  return (c, now = Date.now()) => {
    if (c.displayLinkId != null) {
      const row = link.get(c.displayLinkId) as { revokedAt: number | null; siteIds: string | null } | undefined;
      if (!row || row.revokedAt != null) return { ok: false, reason: "link-revoked" };
      const siteIds = row.siteIds ? (JSON.parse(row.siteIds) as number[]) : [];
      return { ok: true, siteIds: siteIds.length ? siteIds : null };
    }
    const user = c.userId == null ? null : findUserById(db, c.userId);
    if (!user) return { ok: false, reason: "no-account" };
    if (user.disabled) return { ok: false, reason: "disabled" };
    if (!can(user.role, "board.view")) return { ok: false, reason: "forbidden" };
    if (c.sessionId === null) return { ok: false, reason: "no-session" };
    const session = findSession(db, c.sessionId);
    if (!session || session.userId !== user.id || session.revokedAt != null) return { ok: false, reason: "signed-out" };
    if (now - session.lastSeenAt > limits.idleMs) return { ok: false, reason: "idle" };
    if (now - session.createdAt > limits.absoluteMs) return { ok: false, reason: "too-old" };
    const siteIds = siteIdsOfUser(db, user.id);
    return { ok: true, siteIds: siteIds.length ? siteIds : null };
  };
}
