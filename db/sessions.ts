import { and, eq, isNull } from "drizzle-orm";
import type { Db } from "./client";
import { userSessions } from "./schema";

export function createSession(db: Db, s: { id: string; userId: number; ip: string }, now = Date.now()): void {
  db.insert(userSessions).values({ id: s.id, userId: s.userId, ip: s.ip, createdAt: now, lastSeenAt: now }).run();
}

export function findSession(db: Db, id: string) {
  return db.select().from(userSessions).where(eq(userSessions.id, id)).get() ?? null;
}

export function touchSession(db: Db, id: string, now = Date.now()): void {
  db.update(userSessions).set({ lastSeenAt: now }).where(eq(userSessions.id, id)).run();
}

export function revokeSession(db: Db, id: string, now = Date.now()): void {
  db.update(userSessions)
    .set({ revokedAt: now })
    .where(and(eq(userSessions.id, id), isNull(userSessions.revokedAt)))
    .run();
}

export function revokeUserSessions(db: Db, userId: number, now = Date.now()): void {
  db.update(userSessions)
    .set({ revokedAt: now })
    .where(and(eq(userSessions.userId, userId), isNull(userSessions.revokedAt)))
    .run();
}
