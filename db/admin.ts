import type { CompressorDto, CompressorInput, CompressorModelDto, CompressorModelInput } from "@/shared/compressor-schema";
import { stopPressureProblem } from "@/shared/compressor-schema";
import type { Role } from "@/shared/roles";
import type { SiteDto, SiteInput } from "@/shared/site-schema";
import type { UserDto } from "@/shared/user-schema";
import { writeAudit } from "./audit";
import type { Db } from "./client";
import {
  compressorsOfModelAbove,
  createCompressor,
  createModel,
  getCompressor,
  getModel,
  setDeviceSecretHash,
  updateCompressor,
  updateModel,
} from "./compressors";
import { revokeUserSessions } from "./sessions";
import { createSite, getSite, updateSite } from "./sites";
import { countEnabledAdmins, createUser, getUserDto, updateUserAccess } from "./users";

// Administrative writes. Each one runs in a single transaction together with its audit row, so a failure
// anywhere leaves nothing half-written. better-sqlite3 uses one connection, so statements issued through
// `db` inside `db.transaction(...)` belong to that transaction (nested helpers become savepoints).

export type FieldErrors = Record<string, string[]>;

/** A refusal the person can act on: becomes an ActionFailure with the same status and field errors. */
export class AdminRefusal extends Error {
  constructor(
    readonly status: 400 | 404 | 409,
    message: string,
    readonly fieldErrors?: FieldErrors,
  ) {
    super(message);
    this.name = "AdminRefusal";
  }
}

export type AdminActor = { userId: number; email: string; ip?: string };

/** Unique columns an administrator can collide with, and the form field that owns each. */
const uniqueColumns: Record<string, { field: string; message: string }> = {
  "users.email": { field: "email", message: "An account with this e-mail address already exists" },
  "sites.name": { field: "name", message: "Another site already has this name" },
  "sites.code": { field: "code", message: "Another site already uses this code" },
  "compressor_models.name": { field: "name", message: "Another model already has this name" },
  "compressors.serial": { field: "serial", message: "Another compressor already has this serial number" },
  "compressors.device_id": { field: "deviceId", message: "Another compressor already uses this device id" },
};

export type ConstraintViolation = { kind: "unique"; columns: string[] } | { kind: "foreignKey" } | { kind: "other" };

/** Finds a SQLite constraint error in an error or its causes (drizzle wraps driver errors). */
export function constraintViolation(error: unknown): ConstraintViolation | null {
  let e: unknown = error;
  for (let depth = 0; e && depth < 5; depth++) {
    const { code, message } = e as { code?: unknown; message?: unknown };
    if (typeof code === "string" && code.startsWith("SQLITE_CONSTRAINT")) {
      const text = typeof message === "string" ? message : "";
      if (code === "SQLITE_CONSTRAINT_UNIQUE" || code === "SQLITE_CONSTRAINT_PRIMARYKEY") {
        const columns = (text.split("constraint failed:")[1] ?? "")
          .split(",")
          .map((c) => c.trim())
          .filter(Boolean);
        return { kind: "unique", columns };
      }
      if (code === "SQLITE_CONSTRAINT_FOREIGNKEY") return { kind: "foreignKey" };
      return { kind: "other" };
    }
    e = (e as { cause?: unknown }).cause;
  }
  return null;
}

/** Runs a write; turns unique and foreign-key violations into refusals with field errors, rethrows the rest. */
function guarded<T>(write: () => T, onMissingReference?: FieldErrors): T {
  try {
    return write();
  } catch (e) {
    if (e instanceof AdminRefusal) throw e;
    const v = constraintViolation(e);
    if (v?.kind === "unique") {
      const fieldErrors: FieldErrors = {};
      for (const column of v.columns) {
        const known = uniqueColumns[column];
        if (known) fieldErrors[known.field] = [known.message];
      }
      if (Object.keys(fieldErrors).length) {
        throw new AdminRefusal(409, "That value is already in use.", fieldErrors);
      }
    }
    if (v?.kind === "foreignKey" && onMissingReference) {
      throw new AdminRefusal(409, "Something this refers to no longer exists. Reload and try again.", onMissingReference);
    }
    throw e;
  }
}

function uniqueSorted(ids: number[]): number[] {
  return [...new Set(ids)].sort((a, b) => a - b);
}

function audit(db: Db, actor: AdminActor, now: number, entry: Omit<Parameters<typeof writeAudit>[1], "actor" | "actorUserId" | "ip">) {
  writeAudit(db, { ...entry, actorUserId: actor.userId, actor: actor.email, ip: actor.ip ?? "" }, now);
}

// ---- Users ---------------------------------------------------------------------------------------

export type InviteUserInput = { email: string; name: string; role: Role; allSites: boolean; siteIds: number[]; passwordHash: string };

const userSnapshot = (u: UserDto) => ({
  email: u.email,
  name: u.name,
  role: u.role,
  allSites: u.allSites,
  siteIds: u.siteIds,
  disabled: u.disabled,
});

export function adminInviteUser(db: Db, input: InviteUserInput, actor: AdminActor, now = Date.now()): UserDto {
  const siteIds = uniqueSorted(input.siteIds);
  return guarded(
    () =>
      db.transaction(() => {
        const user = createUser(db, { ...input, siteIds }, now);
        audit(db, actor, now, {
          action: "user.invite",
          targetType: "user",
          targetId: user.id,
          details: { after: userSnapshot(user) },
        });
        return user;
      }, { behavior: "immediate" }),
    { siteIds: ["One of the chosen sites no longer exists"] },
  );
}

export type UpdateUserInput = { id: number; role: Role; allSites: boolean; siteIds: number[]; disabled: boolean };

export const LAST_ADMIN_MESSAGE = "This is the last enabled administrator. Make another account an administrator first.";

export function adminUpdateUser(db: Db, input: UpdateUserInput, actor: AdminActor, now = Date.now()): UserDto {
  const siteIds = uniqueSorted(input.siteIds);
  return guarded(
    () =>
      db.transaction(() => {
        const before = getUserDto(db, input.id);
        if (!before) throw new AdminRefusal(404, "This account no longer exists.");
        const wasActiveAdmin = before.role === "admin" && !before.disabled;
        const staysActiveAdmin = input.role === "admin" && !input.disabled;
        if (wasActiveAdmin && !staysActiveAdmin && countEnabledAdmins(db) <= 1) {
          const fieldErrors: FieldErrors = {};
          if (input.role !== "admin") fieldErrors.role = [LAST_ADMIN_MESSAGE];
          if (input.disabled) fieldErrors.disabled = [LAST_ADMIN_MESSAGE];
          const who = before.id === actor.userId ? "You are" : "This is";
          throw new AdminRefusal(
            409,
            `${who} the last enabled administrator. Make another account an administrator before ${
              input.disabled ? "disabling" : "changing the role of"
            } this one.`,
            fieldErrors,
          );
        }
        const after = updateUserAccess(db, { ...input, siteIds }, now);
        if (!after) throw new AdminRefusal(404, "This account no longer exists.");
        const sessionsRevoked = input.disabled && !before.disabled;
        if (sessionsRevoked) revokeUserSessions(db, input.id, now);
        audit(db, actor, now, {
          action: "user.update",
          targetType: "user",
          targetId: after.id,
          details: { before: userSnapshot(before), after: userSnapshot(after), sessionsRevoked },
        });
        return after;
      }, { behavior: "immediate" }),
    { siteIds: ["One of the chosen sites no longer exists"] },
  );
}

// ---- Sites ---------------------------------------------------------------------------------------

export function adminCreateSite(db: Db, input: SiteInput, actor: AdminActor, now = Date.now()): SiteDto {
  return guarded(() =>
    db.transaction(() => {
      const site = createSite(db, input, now);
      audit(db, actor, now, { action: "site.create", targetType: "site", targetId: site.id, siteId: site.id, details: { after: site } });
      return site;
    }, { behavior: "immediate" }),
  );
}

export function adminUpdateSite(db: Db, id: number, input: SiteInput, actor: AdminActor, now = Date.now()): SiteDto {
  return guarded(() =>
    db.transaction(() => {
      const before = getSite(db, id);
      if (!before) throw new AdminRefusal(404, "This site no longer exists.");
      const after = updateSite(db, id, input);
      if (!after) throw new AdminRefusal(404, "This site no longer exists.");
      audit(db, actor, now, { action: "site.update", targetType: "site", targetId: id, siteId: id, details: { before, after } });
      return after;
    }, { behavior: "immediate" }),
  );
}

// ---- Compressor models ---------------------------------------------------------------------------

export function adminCreateModel(db: Db, input: CompressorModelInput, actor: AdminActor, now = Date.now()): CompressorModelDto {
  return guarded(() =>
    db.transaction(() => {
      const model = createModel(db, input, now);
      audit(db, actor, now, { action: "compressor_model.create", targetType: "compressor_model", targetId: model.id, details: { after: model } });
      return model;
    }, { behavior: "immediate" }),
  );
}

export function adminUpdateModel(
  db: Db,
  id: number,
  input: CompressorModelInput,
  actor: AdminActor,
  now = Date.now(),
): CompressorModelDto {
  return guarded(() =>
    db.transaction(() => {
      const before = getModel(db, id);
      if (!before) throw new AdminRefusal(404, "This model no longer exists.");
      const above = compressorsOfModelAbove(db, id, input.ratedPressureBar);
      if (above.length) {
        const names = above.map((c) => `${c.name} (${c.stopPressureBar} bar)`).join(", ");
        throw new AdminRefusal(400, "Some values need correcting.", {
          ratedPressureBar: [`Below the stop pressure of ${names}. Lower their stop pressure first.`],
        });
      }
      const after = updateModel(db, id, input);
      if (!after) throw new AdminRefusal(404, "This model no longer exists.");
      audit(db, actor, now, { action: "compressor_model.update", targetType: "compressor_model", targetId: id, details: { before, after } });
      return after;
    }, { behavior: "immediate" }),
  );
}

// ---- Compressors ---------------------------------------------------------------------------------

const compressorSnapshot = (c: CompressorDto) => ({
  name: c.name,
  siteId: c.siteId,
  modelId: c.modelId,
  serial: c.serial,
  deviceId: c.deviceId,
  stopPressureBar: c.stopPressureBar,
  restartPressureBar: c.restartPressureBar,
  bankVolumeL: c.bankVolumeL,
  inService: c.inService,
});

/** The checks that need the database: the site and model exist, and the stop pressure is within the model's rating. */
function checkCompressor(db: Db, input: CompressorInput): void {
  const fieldErrors: FieldErrors = {};
  if (!getSite(db, input.siteId)) fieldErrors.siteId = ["Choose a site"];
  const model = getModel(db, input.modelId);
  if (!model) fieldErrors.modelId = ["Choose a model"];
  else {
    const problem = stopPressureProblem(input.stopPressureBar, model.ratedPressureBar);
    if (problem) fieldErrors.stopPressureBar = [problem];
  }
  if (Object.keys(fieldErrors).length) throw new AdminRefusal(400, "Some values need correcting.", fieldErrors);
}

const missingSiteOrModel: FieldErrors = { siteId: ["Check the site"], modelId: ["Check the model"] };

export function adminCreateCompressor(db: Db, input: CompressorInput, actor: AdminActor, now = Date.now()): CompressorDto {
  return guarded(
    () =>
      db.transaction(() => {
        checkCompressor(db, input);
        const created = createCompressor(db, input, now);
        audit(db, actor, now, {
          action: "compressor.create",
          targetType: "compressor",
          targetId: created.id,
          siteId: created.siteId,
          details: { after: compressorSnapshot(created) },
        });
        return created;
      }, { behavior: "immediate" }),
    missingSiteOrModel,
  );
}

export function adminUpdateCompressor(
  db: Db,
  id: number,
  input: CompressorInput,
  actor: AdminActor,
  now = Date.now(),
): CompressorDto {
  return guarded(
    () =>
      db.transaction(() => {
        const before = getCompressor(db, id);
        if (!before) throw new AdminRefusal(404, "This compressor no longer exists.");
        checkCompressor(db, input);
        const after = updateCompressor(db, id, input, now);
        if (!after) throw new AdminRefusal(404, "This compressor no longer exists.");
        audit(db, actor, now, {
          action: "compressor.update",
          targetType: "compressor",
          targetId: id,
          siteId: after.siteId,
          details: { before: compressorSnapshot(before), after: compressorSnapshot(after) },
        });
        return after;
      }, { behavior: "immediate" }),
    missingSiteOrModel,
  );
}

/** Stores the hash of a newly issued device secret (replacing any earlier one). The secret itself is never stored or audited. */
export function adminSetDeviceCredential(
  db: Db,
  id: number,
  secretHash: string,
  actor: AdminActor,
  now = Date.now(),
): CompressorDto {
  return db.transaction(() => {
    const before = getCompressor(db, id);
    if (!before) throw new AdminRefusal(404, "This compressor no longer exists.");
    setDeviceSecretHash(db, id, secretHash, now);
    audit(db, actor, now, {
      action: "compressor.credential_issued",
      targetType: "compressor",
      targetId: id,
      siteId: before.siteId,
      details: { deviceId: before.deviceId, replacedEarlier: before.hasDeviceCredential },
    });
    return { ...before, hasDeviceCredential: true };
  }, { behavior: "immediate" });
}
