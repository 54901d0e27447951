import { createHmac, hkdfSync, randomBytes, timingSafeEqual } from "node:crypto";

/** How long a browser has to open the live WebSocket with a fresh token. */
export const LIVE_TOKEN_TTL_MS = 60_000;
const MAX_TTL_MS = 10 * 60_000;

export type LiveTokenSubject =
  | { userId: number; /** The sign-in session the token was issued to; the socket ends with it. */ sessionId?: string; displayLinkId?: never }
  | { displayLinkId: number; userId?: never; sessionId?: never };

export type LiveTokenInput = LiveTokenSubject & {
  /** Sites the holder may see; null means every site. */
  siteIds: number[] | null;
  ttlMs?: number;
};

export type LiveTokenClaims = {
  userId: number | null;
  sessionId: string | null;
  displayLinkId: number | null;
  siteIds: number[] | null;
  issuedAt: number;
  expiresAt: number;
};

type Payload = { v: 1; u?: number; x?: string; d?: number; s: number[] | null; iat: number; exp: number; n: string };

function signingKey(secret: string | undefined): Buffer {
  if (!secret) throw new Error("NEXTAUTH_SECRET is not set");
  // A key of its own, so this token can never be mistaken for a session token signed with the same secret.
  return Buffer.from(hkdfSync("sha256", secret, "airkeep", "live-websocket-token-v1", 32));
}

function sign(key: Buffer, body: string): Buffer {
  return createHmac("sha256", key).update(body).digest();
}

export function createLiveToken(input: LiveTokenInput, secret = process.env.NEXTAUTH_SECRET, now = Date.now()): string {
  const ttl = Math.min(Math.max(1, input.ttlMs ?? LIVE_TOKEN_TTL_MS), MAX_TTL_MS);
  const payload: Payload = {
    v: 1,
    s: input.siteIds ? [...new Set(input.siteIds)].sort((a, b) => a - b) : null,
    iat: now,
    exp: now + ttl,
    n: randomBytes(9).toString("base64url"),
  };
  if (input.userId !== undefined) {
    payload.u = input.userId;
    if (input.sessionId) payload.x = input.sessionId;
  } else payload.d = input.displayLinkId;
  const body = Buffer.from(JSON.stringify(payload)).toString("base64url");
  return `${body}.${sign(signingKey(secret), body).toString("base64url")}`;
}

const isId = (x: unknown): x is number => Number.isSafeInteger(x) && (x as number) > 0;

/** The token's claims if its signature is good and it has not expired; otherwise null. */
export function verifyLiveToken(
  token: string | null | undefined,
  secret = process.env.NEXTAUTH_SECRET,
  now = Date.now(),
): LiveTokenClaims | null {
  if (!token || token.length > 2048) return null;
  const dot = token.indexOf(".");
  if (dot <= 0 || dot !== token.lastIndexOf(".")) return null;
  const body = token.slice(0, dot);
  const mac = Buffer.from(token.slice(dot + 1), "base64url");
  const expected = sign(signingKey(secret), body);
  if (mac.length !== expected.length || !timingSafeEqual(mac, expected)) return null;
  let p: Payload;
  try {
    p = JSON.parse(Buffer.from(body, "base64url").toString("utf8")) as Payload;
  } catch {
    return null;
  }
  if (p?.v !== 1 || !Number.isFinite(p.iat) || !Number.isFinite(p.exp)) return null;
  if (now >= p.exp || p.exp - p.iat > MAX_TTL_MS) return null;
  const hasUser = isId(p.u);
  const hasLink = isId(p.d);
  if (hasUser === hasLink) return null;
  if (p.s !== null && !(Array.isArray(p.s) && p.s.every(isId))) return null;
  if (p.x !== undefined && (!hasUser || typeof p.x !== "string" || p.x.length === 0 || p.x.length > 128)) return null;
  return {
    userId: hasUser ? (p.u as number) : null,
    sessionId: p.x ?? null,
    displayLinkId: hasLink ? (p.d as number) : null,
    siteIds: p.s,
    issuedAt: p.iat,
    expiresAt: p.exp,
  };
}
