import { createHash, randomBytes } from "node:crypto";
import { desc, eq, inArray } from "drizzle-orm";
import type { DisplayLinkDto } from "@/shared/display-link-schema";
import { writeAudit } from "./audit";
import type { Db } from "./client";
import type { Theme } from "@/shared/palette";
import type { UnitPreference } from "@/shared/units";
import { displayLinks, sites, users } from "./schema";

// Display links: a wall screen opens /display/<token>. The token is shown once to the administrator who made it;
// only its SHA-256 hash is stored, so a copy of the database does not open any screen.

export type DisplayLinkActor = { userId: number; email: string; ip?: string };

export class DisplayLinkRefusal extends Error {
  constructor(
    readonly status: 400 | 404 | 409,
    message: string,
    readonly fieldErrors?: Record<string, string[]>,
  ) {
    super(message);
    this.name = "DisplayLinkRefusal";
  }
}

/** 32 random bytes, base64url: 43 characters. */
export const DISPLAY_TOKEN_PATTERN = /^[A-Za-z0-9_-]{43}$/;

export function newDisplayToken(): string {
  return randomBytes(32).toString("base64url");
}

export function hashDisplayToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

function siteNamesById(db: Db): Map<number, string> {
  return new Map(db.select({ id: sites.id, name: sites.name }).from(sites).all().map((s) => [s.id, s.name]));
}

export function listDisplayLinks(db: Db): DisplayLinkDto[] {
  const names = siteNamesById(db);
  return db
    .select({
      id: displayLinks.id,
      label: displayLinks.label,
      siteIds: displayLinks.siteIds,
      theme: displayLinks.theme,
      pressureUnit: displayLinks.pressureUnit,
      temperatureUnit: displayLinks.temperatureUnit,
      createdByName: users.name,
      createdAt: displayLinks.createdAt,
      revokedAt: displayLinks.revokedAt,
      lastUsedAt: displayLinks.lastUsedAt,
    })
    .from(displayLinks)
    .innerJoin(users, eq(users.id, displayLinks.createdBy))
    .orderBy(desc(displayLinks.createdAt), desc(displayLinks.id))
    .all()
    .map((l) => ({ ...l, siteNames: l.siteIds ? l.siteIds.map((id) => names.get(id) ?? `Site ${id}`) : null }));
}

function getDisplayLink(db: Db, id: number): DisplayLinkDto | null {
  return listDisplayLinks(db).find((l) => l.id === id) ?? null;
}

/** Creates a link and returns it with its token (the only time the token exists outside the screen's address bar). */
export function createDisplayLink(
  db: Db,
  input: { label: string; siteIds: number[] | null; theme?: Theme; units?: UnitPreference },
  actor: DisplayLinkActor,
  now = Date.now(),
): { link: DisplayLinkDto; token: string } {
  const siteIds = input.siteIds && input.siteIds.length ? [...new Set(input.siteIds)].sort((a, b) => a - b) : null;
  return db.transaction(() => {
    if (siteIds) {
      const found = db.select({ id: sites.id }).from(sites).where(inArray(sites.id, siteIds)).all();
      if (found.length !== siteIds.length) {
        throw new DisplayLinkRefusal(409, "One of the chosen sites no longer exists. Reload and try again.", {
          siteIds: ["One of the chosen sites no longer exists"],
        });
      }
    }
    const token = newDisplayToken();
    const { id } = db
      .insert(displayLinks)
      .values({
        tokenHash: hashDisplayToken(token),
        label: input.label,
        siteIds,
        createdBy: actor.userId,
        createdAt: now,
        ...(input.theme ? { theme: input.theme } : {}),
        ...(input.units ? { pressureUnit: input.units.pressureUnit, temperatureUnit: input.units.temperatureUnit } : {}),
      })
      .returning({ id: displayLinks.id })
      .get();
    writeAudit(
      db,
      {
        actorUserId: actor.userId,
        actor: actor.email,
        ip: actor.ip ?? "",
        action: "display_link.create",
        targetType: "display_link",
        targetId: id,
        details: { label: input.label, siteIds, theme: input.theme ?? "dark", units: input.units ?? null },
      },
      now,
    );
    return { link: getDisplayLink(db, id)!, token };
  }, { behavior: "immediate" });
}

export function revokeDisplayLink(db: Db, id: number, actor: DisplayLinkActor, now = Date.now()): DisplayLinkDto {
  return db.transaction(() => {
    const before = getDisplayLink(db, id);
    if (!before) throw new DisplayLinkRefusal(404, "This display link no longer exists.");
    if (before.revokedAt != null) return before;
    db.update(displayLinks).set({ revokedAt: now }).where(eq(displayLinks.id, id)).run();
    writeAudit(
      db,
      {
        actorUserId: actor.userId,
        actor: actor.email,
        ip: actor.ip ?? "",
        action: "display_link.revoke",
        targetType: "display_link",
        targetId: id,
        details: { label: before.label, siteIds: before.siteIds, lastUsedAt: before.lastUsedAt },
      },
      now,
    );
    return { ...before, revokedAt: now };
  }, { behavior: "immediate" });
}

export type DisplayAccess =
  | { status: "ok"; id: number; label: string; siteIds: number[] | null; theme: Theme; units: UnitPreference }
  | { status: "revoked" }
  | { status: "unknown" };

/** Only touch last_used_at this often, so a screen polling every few seconds does not write every time. */
const TOUCH_EVERY_MS = 60_000;

/** Looks a link token up by its hash; records the use on a valid link. */
export function resolveDisplayLink(db: Db, token: string | null | undefined, now = Date.now()): DisplayAccess {
  if (!token || !DISPLAY_TOKEN_PATTERN.test(token)) return { status: "unknown" };
  const row = db
    .select({
      id: displayLinks.id,
      label: displayLinks.label,
      siteIds: displayLinks.siteIds,
      revokedAt: displayLinks.revokedAt,
      lastUsedAt: displayLinks.lastUsedAt,
      theme: displayLinks.theme,
      pressureUnit: displayLinks.pressureUnit,
      temperatureUnit: displayLinks.temperatureUnit,
    })
    .from(displayLinks)
    .where(eq(displayLinks.tokenHash, hashDisplayToken(token)))
    .get();
  if (!row) return { status: "unknown" };
  if (row.revokedAt != null) return { status: "revoked" };
  if (row.lastUsedAt == null || now - row.lastUsedAt > TOUCH_EVERY_MS) {
    db.update(displayLinks).set({ lastUsedAt: now }).where(eq(displayLinks.id, row.id)).run();
  }
  return {
    status: "ok",
    id: row.id,
    label: row.label,
    siteIds: row.siteIds && row.siteIds.length ? row.siteIds : null,
    theme: row.theme,
    units: { pressureUnit: row.pressureUnit, temperatureUnit: row.temperatureUnit },
  };
}
