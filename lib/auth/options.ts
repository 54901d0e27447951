import { randomUUID } from "node:crypto";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { writeAudit } from "@/db/audit";
import { getDb } from "@/db/client";
import { createSession } from "@/db/sessions";
import { reserveSignInAttempt, settleSignInAttempt } from "@/db/sign-in-attempts";
import { findUserByEmail } from "@/db/users";
import { clientAddress } from "@/lib/web/request-facts";
import { signInSchema } from "@/shared/user-schema";
import { sessionPolicy } from "./policy";
import { resolveSession } from "./session-check";
import { DUMMY_HASH, verifyPassword } from "./password";

export class SignInRefused extends Error {}

class SessionEnded extends Error {
  constructor() {
    super("The session has ended.");
  }
}

/** Checks the rate limits, the password and the account; writes every outcome to the audit log. */
export async function authenticate(rawEmail: unknown, rawPassword: unknown, ip: string) {
  const db = getDb();
  const parsed = signInSchema.safeParse({ email: rawEmail, password: rawPassword });
  if (!parsed.success) throw new SignInRefused("Enter your e-mail address and password.");
  const { email, password } = parsed.data;
  const { failureWindowMs, maxFailuresPerAccount, maxFailuresPerAddress } = sessionPolicy();
  const since = Date.now() - failureWindowMs;
  const minutes = Math.round(failureWindowMs / 60_000);

  // The attempt is reserved before the password check (which awaits), so parallel tries cannot all pass the limit.
  const attempt = reserveSignInAttempt(
    db,
    { account: email, address: ip },
    { since, maxPerAccount: maxFailuresPerAccount, maxPerAddress: maxFailuresPerAddress },
  );
  if (attempt === null) {
    writeAudit(db, { actor: email, action: "auth.sign_in_throttled", ip });
    throw new SignInRefused(`Too many failed sign-ins. Wait ${minutes} minutes and try again, or ask an administrator.`);
  }

  const user = findUserByEmail(db, email);
  const ok = await verifyPassword(password, user?.passwordHash ?? DUMMY_HASH);
  if (!user || !ok) {
    settleSignInAttempt(db, attempt, false);
    writeAudit(db, { actor: email, action: "auth.sign_in_failed", ip, details: { reason: user ? "password" : "unknown account" } });
    throw new SignInRefused("Wrong e-mail address or password.");
  }
  if (user.disabled) {
    settleSignInAttempt(db, attempt, false);
    writeAudit(db, { actorUserId: user.id, actor: email, action: "auth.sign_in_failed", ip, details: { reason: "disabled" } });
    throw new SignInRefused("This account is disabled. Ask an administrator.");
  }
  settleSignInAttempt(db, attempt, true);
  const sid = randomUUID();
  createSession(db, { id: sid, userId: user.id, ip });
  writeAudit(db, { actorUserId: user.id, actor: email, action: "auth.sign_in", ip });
  return { id: String(user.id), email: user.email, name: user.name, role: user.role, sid };
}

export const authOptions: NextAuthOptions = {
  secret: process.env.NEXTAUTH_SECRET,
  session: { strategy: "jwt", maxAge: Math.ceil(sessionPolicy().absoluteMs / 1000) },
  pages: { signIn: "/login", error: "/login" },
  providers: [
    CredentialsProvider({
      name: "Airkeep",
      credentials: {
        email: { label: "E-mail", type: "email" },
        password: { label: "Password", type: "password" },
      },
      async authorize(credentials, req) {
        return authenticate(credentials?.email, credentials?.password, clientAddress(req?.headers as Record<string, string | undefined> | undefined));
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        const u = user as unknown as { id: string; role: string; sid: string };
        token.uid = Number(u.id);
        token.sid = u.sid;
        token.role = u.role;
        return token;
      }
      // A token whose session was signed out, revoked or timed out is no session: next-auth then answers
      // /api/auth/session with nobody and clears the cookie.
      if (!resolveSession(getDb(), { uid: token.uid, sid: token.sid })) throw new SessionEnded();
      return token;
    },
    async session({ session, token }) {
      session.uid = token.uid;
      session.sid = token.sid;
      session.role = token.role;
      return session;
    },
  },
  logger: {
    error(code, metadata) {
      // An ended session is an expected outcome, not a server error.
      if (code === "JWT_SESSION_ERROR" && metadata instanceof SessionEnded) return;
      console.error(`[next-auth][error][${code}]`, metadata);
    },
  },
  events: {
    async signOut({ token }) {
      if (!token?.sid) return;
      const { revokeSession } = await import("@/db/sessions");
      const db = getDb();
      revokeSession(db, token.sid);
      writeAudit(db, { actorUserId: token.uid ?? null, actor: token.email ?? "unknown", action: "auth.sign_out" });
    },
  },
};
