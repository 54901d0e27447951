import { randomUUID } from "node:crypto";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { countAuditByActor, countAuditByIp, writeAudit } from "@/db/audit";
import { getDb } from "@/db/client";
import { createSession } from "@/db/sessions";
import { findUserByEmail } from "@/db/users";
import { signInSchema } from "@/shared/user-schema";
import { sessionPolicy } from "./policy";
import { DUMMY_HASH, verifyPassword } from "./password";

type HeaderBag = Record<string, string | string[] | undefined> | Headers | undefined;

function header(headers: HeaderBag, name: string): string | undefined {
  if (!headers) return undefined;
  if (typeof (headers as Headers).get === "function") return (headers as Headers).get(name) ?? undefined;
  const v = (headers as Record<string, string | string[] | undefined>)[name];
  return Array.isArray(v) ? v[0] : v;
}

export function clientAddress(headers: HeaderBag): string {
  const forwarded = header(headers, "x-forwarded-for")?.split(",")[0]?.trim();
  return forwarded || header(headers, "x-real-ip") || "local";
}

export class SignInRefused extends Error {}

/** Checks the rate limits, the password and the account; writes every outcome to the audit log. */
export async function authenticate(rawEmail: unknown, rawPassword: unknown, ip: string) {
  const db = getDb();
  const parsed = signInSchema.safeParse({ email: rawEmail, password: rawPassword });
  if (!parsed.success) throw new SignInRefused("Enter your e-mail address and password.");
  const { email, password } = parsed.data;
  const { failureWindowMs, maxFailuresPerAccount, maxFailuresPerAddress } = sessionPolicy();
  const since = Date.now() - failureWindowMs;
  const minutes = Math.round(failureWindowMs / 60_000);

  if (
    countAuditByActor(db, "auth.sign_in_failed", email, since) >= maxFailuresPerAccount ||
    countAuditByIp(db, "auth.sign_in_failed", ip, since) >= maxFailuresPerAddress
  ) {
    writeAudit(db, { actor: email, action: "auth.sign_in_throttled", ip });
    throw new SignInRefused(`Too many failed sign-ins. Wait ${minutes} minutes and try again, or ask an administrator.`);
  }

  const user = findUserByEmail(db, email);
  const ok = await verifyPassword(password, user?.passwordHash ?? DUMMY_HASH);
  if (!user || !ok) {
    writeAudit(db, { actor: email, action: "auth.sign_in_failed", ip, details: { reason: user ? "password" : "unknown account" } });
    throw new SignInRefused("Wrong e-mail address or password.");
  }
  if (user.disabled) {
    writeAudit(db, { actorUserId: user.id, actor: email, action: "auth.sign_in_failed", ip, details: { reason: "disabled" } });
    throw new SignInRefused("This account is disabled. Ask an administrator.");
  }
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
        return authenticate(credentials?.email, credentials?.password, clientAddress(req?.headers as HeaderBag));
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
      }
      return token;
    },
    async session({ session, token }) {
      session.uid = token.uid;
      session.sid = token.sid;
      session.role = token.role;
      return session;
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
