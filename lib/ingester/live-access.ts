import type { Db } from "@/db/client";
import type { LiveTokenClaims } from "@/lib/live-token";

/**
 * Whether an open live socket may stay open, asked at every ping: a display link until it is revoked; a person while
 * the account is enabled and the sign-in session the token was issued to is neither signed out nor revoked.
 */
export function liveAccessCheck(db: Db): (claims: LiveTokenClaims) => boolean {
  const linkRevoked = db.$client.prepare("SELECT revoked_at IS NOT NULL FROM display_links WHERE id = ?").pluck();
  const userDisabled = db.$client.prepare("SELECT disabled FROM users WHERE id = ?").pluck();
  const sessionOpen = db.$client.prepare("SELECT revoked_at IS NULL FROM user_sessions WHERE id = ? AND user_id = ?").pluck();
  return (c) => {
    if (c.displayLinkId != null) return linkRevoked.get(c.displayLinkId) === 0;
    if (c.userId == null || userDisabled.get(c.userId) !== 0) return false;
    return c.sessionId === null || sessionOpen.get(c.sessionId, c.userId) === 1;
  };
}
