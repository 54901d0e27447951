import { and, asc, eq } from "drizzle-orm";
import type { Role } from "@/shared/roles";
import type { UnitPreference } from "@/shared/units";
import type { UserDto } from "@/shared/user-schema";
import type { Db } from "./client";
import { users, userSites, type UserRow } from "./schema";


export function findUserByEmail(db: Db, email: string): UserRow | null {
  return db.select().from(users).where(eq(users.email, email.toLowerCase())).get() ?? null;
}

export function findUserById(db: Db, id: number): UserRow | null {
  return db.select().from(users).where(eq(users.id, id)).get() ?? null;
}

/** The sites a person may see: null for every site (administrators, and anyone marked so), else the listed ones (maybe none). */
export function siteScopeOf(db: Db, user: Pick<UserRow, "id" | "role" | "allSites">): number[] | null {
  return user.role === "admin" || user.allSites ? null : siteIdsOfUser(db, user.id);
}

export function siteIdsOfUser(db: Db, userId: number): number[] {
  return db
    .select({ siteId: userSites.siteId })
    .from(userSites)
    .where(eq(userSites.userId, userId))
    .all()
    .map((r) => r.siteId);
}

function toDto(u: UserRow, siteIds: number[]): UserDto {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    role: u.role,
    disabled: u.disabled,
    allSites: u.allSites,
    siteIds,
    pressureUnit: u.pressureUnit,
    temperatureUnit: u.temperatureUnit,
    createdAt: u.createdAt,
  };
}

export function listUsers(db: Db): UserDto[] {
  const rows = db.select().from(users).orderBy(asc(users.email)).all();
  const scopes = new Map<number, number[]>();
  for (const s of db.select().from(userSites).all()) {
    scopes.set(s.userId, [...(scopes.get(s.userId) ?? []), s.siteId]);
  }
  return rows.map((u) => toDto(u, scopes.get(u.id) ?? []));
}

export function getUserDto(db: Db, id: number): UserDto | null {
  const u = findUserById(db, id);
  return u ? toDto(u, siteIdsOfUser(db, id)) : null;
}

export type NewUser = { email: string; name: string; role: Role; passwordHash: string; allSites: boolean; siteIds: number[] };

/** What is stored for a scope: administrators and "every site" keep no site list. */
function storedScope(input: { role: Role; allSites: boolean; siteIds: number[] }) {
  const allSites = input.role === "admin" || input.allSites;
  return { allSites, siteIds: allSites ? [] : input.siteIds };
}

export function createUser(db: Db, input: NewUser, now = Date.now()): UserDto {
  const scope = storedScope(input);
  return db.transaction((tx) => {
    const row = tx
      .insert(users)
      .values({
        email: input.email.toLowerCase(),
        name: input.name,
        role: input.role,
        passwordHash: input.passwordHash,
        allSites: scope.allSites,
        createdAt: now,
        updatedAt: now,
      })
      .returning()
      .get();
    if (scope.siteIds.length) {
      tx.insert(userSites)
        .values(scope.siteIds.map((siteId) => ({ userId: row.id, siteId })))
        .run();
    }
    return toDto(row, scope.siteIds);
  }, { behavior: "immediate" });
}

export function updateUserAccess(
  db: Db,
  input: { id: number; role: Role; allSites: boolean; siteIds: number[]; disabled: boolean },
  now = Date.now(),
): UserDto | null {
  const scope = storedScope(input);
  return db.transaction((tx) => {
    const row = tx
      .update(users)
      .set({ role: input.role, allSites: scope.allSites, disabled: input.disabled, updatedAt: now })
      .where(eq(users.id, input.id))
      .returning()
      .get();
    if (!row) return null;
    tx.delete(userSites).where(eq(userSites.userId, input.id)).run();
    if (scope.siteIds.length) {
      tx.insert(userSites)
        .values(scope.siteIds.map((siteId) => ({ userId: input.id, siteId })))
        .run();
    }
    return toDto(row, scope.siteIds);
  }, { behavior: "immediate" });
}

export function setUserUnits(db: Db, id: number, units: UnitPreference, now = Date.now()): void {
  db.update(users)
    .set({ pressureUnit: units.pressureUnit, temperatureUnit: units.temperatureUnit, updatedAt: now })
    .where(eq(users.id, id))
    .run();
}



/** Administrators who can still sign in; the last one may not be demoted or disabled. */
export function countEnabledAdmins(db: Db): number {
  return db
    .select({ id: users.id })
    .from(users)
    .where(and(eq(users.role, "admin"), eq(users.disabled, false)))
    .all().length;
}
