import type { Db } from "@/db/client";
import { findSession } from "@/db/sessions";
import { findUserById } from "@/db/users";
import type { LiveTokenClaims } from "@/lib/live-token";

/**
 * Whether an open live socket may stay open, asked at every ping: a display link until it is revoked; a person while
 * the account is enabled and the sign-in session the token was issued to is neither signed out nor revoked.
 */
export function liveAccessCheck(db: Db): (claims: LiveTokenClaims) => boolean {
  const linkRevoked = db.$client.prepare("SELECT revoked_at IS NOT NULL FROM display_links WHERE id = ?").pluck();
  return (c) => {
    if (c.displayLinkId != null) return linkRevoked.get(c.displayLinkId) === 0;
    const user = c.userId == null ? null : findUserById(db, c.userId);
    if (!user || user.disabled) return false;
    if (c.sessionId === null) return true;
    const session = findSession(db, c.sessionId);
    return session !== null && session.userId === user.id && session.revokedAt == null;
  };
}
