/**
 * Editing threshold sets: reads for the editor, and the one write path (save, and revert, which saves an earlier
 * version) with its optimistic version check, validation against what the set inherits, and audit entry, all in one
 * IMMEDIATE transaction. The live engine sees the change through thresholdsVersion() at its next tick.
 */
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { limitKey, signalInfo } from "@/shared/alarm-rules";
import { can, denialReason, type Role } from "@/shared/roles";
import {
  diffRows,
  fieldErrorsByPath,
  sortRows,
  thresholdSaveSchema,
  type RowChange,
  type ScopeType,
  type ThresholdHistoryEntry,
  type ThresholdOverviewDto,
  type ThresholdRow,
  type ThresholdSetDto,
} from "@/shared/threshold-schema";
import type { UnitPreference } from "@/shared/units";
import { writeAudit } from "./audit";
import type { Db } from "./client";
import { auditLog, compressorModels, compressors, sites, thresholdLimits, thresholdSets, users } from "./schema";

export const THRESHOLD_AUDIT_ACTION = "threshold.update";

/** Who is looking or editing: role and site scope decide what they may see and save. */
export type ThresholdActor = {
  userId: number;
  name: string;
  email: string;
  role: Role;
  /** null: every site. */
  siteIds: number[] | null;
  units: UnitPreference;
  ip?: string;
};

export class ThresholdRefusal extends Error {
  constructor(
    readonly status: 400 | 403 | 404 | 409,
    message: string,
    readonly fieldErrors?: Record<string, string[]>,
  ) {
    super(message);
  }
}

const rowColumns = {
  signal: thresholdLimits.signal,
  direction: thresholdLimits.direction,
  priority: thresholdLimits.priority,
  value: thresholdLimits.value,
  deadband: thresholdLimits.deadband,
  onDelayS: thresholdLimits.onDelayS,
  offDelayS: thresholdLimits.offDelayS,
  enabled: thresholdLimits.enabled,
};

/** The stored rows of one set, in display order. Rows naming an unknown signal are left out (as mergeLimits does). */
export function readSetRows(db: Db, scopeType: ScopeType, scopeId: number): ThresholdRow[] {
  const rows = db
    .select(rowColumns)
    .from(thresholdLimits)
    .where(and(eq(thresholdLimits.scopeType, scopeType), eq(thresholdLimits.scopeId, scopeId)))
    .all();
  return sortRows(rows.filter((r) => r.signal in signalInfo) as ThresholdRow[]);
}

type SetHead = { version: number; updatedAt: number | null; updatedByName: string | null };

function readSetHead(db: Db, scopeType: ScopeType, scopeId: number): SetHead {
  const row = db
    .select({ version: thresholdSets.version, updatedAt: thresholdSets.updatedAt, updatedByName: users.name })
    .from(thresholdSets)
    .leftJoin(users, eq(users.id, thresholdSets.updatedBy))
    .where(and(eq(thresholdSets.scopeType, scopeType), eq(thresholdSets.scopeId, scopeId)))
    .get();
  return row ?? { version: 0, updatedAt: null, updatedByName: null };
}

type ScopeInfo = {
  label: string;
  model: ThresholdSetDto["model"];
  /** Compressors the set applies to (all of them, whatever the person's sites). */
  units: { id: number; name: string; siteId: number; siteName: string; timeZone: string }[];
  /** The compressor's site, for the event log; null for a template. */
  siteId: number | null;
};

function unitsOf(db: Db, where: ReturnType<typeof eq>) {
  return db
    .select({ id: compressors.id, name: compressors.name, siteId: compressors.siteId, siteName: sites.name, timeZone: sites.timeZone })
    .from(compressors)
    .innerJoin(sites, eq(sites.id, compressors.siteId))
    .where(where)
    .orderBy(asc(sites.name), asc(compressors.name))
    .all();
}

function scopeInfo(db: Db, scopeType: ScopeType, scopeId: number): ScopeInfo | null {
  const modelColumns = {
    id: compressorModels.id,
    name: compressorModels.name,
    stages: compressorModels.stages,
    ratedPressureBar: compressorModels.ratedPressureBar,
  };
  if (scopeType === "model") {
    const model = db.select(modelColumns).from(compressorModels).where(eq(compressorModels.id, scopeId)).get();
    if (!model) return null;
    return { label: `${model.name} (template)`, model, units: unitsOf(db, eq(compressors.modelId, model.id)), siteId: null };
  }
  const units = unitsOf(db, eq(compressors.id, scopeId));
  const unit = units[0];
  if (!unit) return null;
  const modelId = db.select({ modelId: compressors.modelId }).from(compressors).where(eq(compressors.id, scopeId)).get()!.modelId;
  const model = db.select(modelColumns).from(compressorModels).where(eq(compressorModels.id, modelId)).get()!;
  return { label: unit.name, model, units, siteId: unit.siteId };
}

const seesSite = (actor: Pick<ThresholdActor, "siteIds">, siteId: number) => actor.siteIds === null || actor.siteIds.includes(siteId);

/** A set the person may look at: a compressor of their sites, or a template (any model). Null reads as "no such set". */
function visibleScope(db: Db, scopeType: ScopeType, scopeId: number, actor: Pick<ThresholdActor, "siteIds">): ScopeInfo | null {
  const info = scopeInfo(db, scopeType, scopeId);
  if (!info) return null;
  if (scopeType === "compressor" && !seesSite(actor, info.units[0]!.siteId)) return null;
  return info;
}

/** Why this person may not save this set (role, or a template that also governs sites outside their scope). */
function readOnlyReason(info: ScopeInfo, scopeType: ScopeType, actor: Pick<ThresholdActor, "role" | "siteIds">): string | null {
  if (!can(actor.role, "thresholds.edit")) return denialReason("thresholds.edit");
  if (scopeType === "model" && info.units.some((u) => !seesSite(actor, u.siteId))) {
    return "This template also governs compressors at sites outside yours: only someone who looks after every one of those sites may change it.";
  }
  return null;
}

export function getThresholdSet(db: Db, scopeType: ScopeType, scopeId: number, actor: Pick<ThresholdActor, "role" | "siteIds">): ThresholdSetDto | null {
  const info = visibleScope(db, scopeType, scopeId, actor);
  if (!info) return null;
  const head = readSetHead(db, scopeType, scopeId);
  return {
    scopeType,
    scopeId,
    label: info.label,
    version: head.version,
    updatedAt: head.updatedAt,
    updatedByName: head.updatedByName,
    rows: readSetRows(db, scopeType, scopeId),
    inherited: scopeType === "compressor" ? readSetRows(db, "model", info.model.id) : [],
    model: info.model,
    compressors: info.units.filter((u) => seesSite(actor, u.siteId)).map(({ id, name, siteName, timeZone }) => ({ id, name, siteName, timeZone })),
    readOnlyReason: readOnlyReason(info, scopeType, actor),
  };
}

/** Every model with its template size, and the person's compressors under it with their override counts. */
export function thresholdOverview(db: Db, actor: Pick<ThresholdActor, "siteIds">): ThresholdOverviewDto {
  const counts = new Map<string, number>();
  for (const r of db
    .select({ scopeType: thresholdLimits.scopeType, scopeId: thresholdLimits.scopeId })
    .from(thresholdLimits)
    .all()) {
    const k = `${r.scopeType}:${r.scopeId}`;
    counts.set(k, (counts.get(k) ?? 0) + 1);
  }
  const models = db
    .select({ id: compressorModels.id, name: compressorModels.name, stages: compressorModels.stages })
    .from(compressorModels)
    .orderBy(asc(compressorModels.name))
    .all();
  const units = db
    .select({ id: compressors.id, name: compressors.name, modelId: compressors.modelId, siteId: compressors.siteId, siteName: sites.name })
    .from(compressors)
    .innerJoin(sites, eq(sites.id, compressors.siteId))
    .orderBy(asc(sites.name), asc(compressors.name))
    .all()
    .filter((u) => seesSite(actor, u.siteId));
  return {
    models: models.map((m) => ({
      ...m,
      limits: counts.get(`model:${m.id}`) ?? 0,
      compressors: units
        .filter((u) => u.modelId === m.id)
        .map((u) => ({ id: u.id, name: u.name, siteName: u.siteName, overrides: counts.get(`compressor:${u.id}`) ?? 0 })),
    })),
  };
}

export type SaveThresholdsInput = {
  scopeType: ScopeType;
  scopeId: number;
  baseVersion: number;
  reason: string;
  limits: unknown;
};

export type SaveThresholdsResult = { version: number; changes: RowChange[]; auditId: number };

const conflictText = (head: SetHead) =>
  `Someone else saved this set while you were editing it (version ${head.version}` +
  `${head.updatedByName ? `, by ${head.updatedByName}` : ""}). Your changes were not saved: the newer values are shown — check them, then apply your change again.`;

/**
 * Saves a whole set: validated against what it inherits (or, for a template, as it stands), refused when the set has
 * moved past baseVersion, audited with before and after. Returns the new version.
 */
export function saveThresholdSet(
  db: Db,
  input: SaveThresholdsInput,
  actor: ThresholdActor,
  now = Date.now(),
  extra: { revertOf?: number } = {},
): SaveThresholdsResult {
  const sqlite = db.$client;
  return sqlite
    .transaction((): SaveThresholdsResult => {
      const info = visibleScope(db, input.scopeType, input.scopeId, actor);
      if (!info) throw new ThresholdRefusal(404, "No such threshold set.");
      const denied = readOnlyReason(info, input.scopeType, actor);
      if (denied) throw new ThresholdRefusal(403, denied);

      const inherited = input.scopeType === "compressor" ? readSetRows(db, "model", info.model.id) : [];
      const parsed = thresholdSaveSchema({ scopeType: input.scopeType, inherited, units: actor.units }).safeParse(input);
      if (!parsed.success) throw new ThresholdRefusal(400, "Some values need correcting.", fieldErrorsByPath(parsed.error));
      const data = parsed.data;

      const head = readSetHead(db, data.scopeType, data.scopeId);
      if (head.version !== data.baseVersion) throw new ThresholdRefusal(409, conflictText(head));

      const before = readSetRows(db, data.scopeType, data.scopeId);
      const after = sortRows(data.limits.map((l) => ({ ...l })));
      const changes = diffRows(before, after);
      if (changes.length === 0) throw new ThresholdRefusal(400, "Nothing to save: the set already has these values.");

      // Rows keep their ids where they stay, so the history of a row is its own.
      const existing = new Map(
        db
          .select({ id: thresholdLimits.id, ...rowColumns })
          .from(thresholdLimits)
          .where(and(eq(thresholdLimits.scopeType, data.scopeType), eq(thresholdLimits.scopeId, data.scopeId)))
          .all()
          .map((r) => [limitKey(r as ThresholdRow), r.id]),
      );
      const keep = new Set(after.map(limitKey));
      const gone = [...existing].filter(([k]) => !keep.has(k)).map(([, id]) => id);
      if (gone.length) db.delete(thresholdLimits).where(inArray(thresholdLimits.id, gone)).run();
      for (const r of after) {
        const id = existing.get(limitKey(r));
        const values = { ...r, updatedAt: now, updatedBy: actor.userId };
        if (id !== undefined) db.update(thresholdLimits).set(values).where(eq(thresholdLimits.id, id)).run();
        else db.insert(thresholdLimits).values({ scopeType: data.scopeType, scopeId: data.scopeId, ...values }).run();
      }
      const version = head.version + 1;
      db.insert(thresholdSets)
        .values({ scopeType: data.scopeType, scopeId: data.scopeId, version, updatedAt: now, updatedBy: actor.userId })
        .onConflictDoUpdate({
          target: [thresholdSets.scopeType, thresholdSets.scopeId],
          set: { version, updatedAt: now, updatedBy: actor.userId },
        })
        .run();

      writeAudit(
        db,
        {
          actorUserId: actor.userId,
          actor: actor.email,
          action: THRESHOLD_AUDIT_ACTION,
          targetType: data.scopeType === "model" ? "compressor_model" : "compressor",
          targetId: data.scopeId,
          siteId: info.siteId,
          compressorId: data.scopeType === "compressor" ? data.scopeId : null,
          ip: actor.ip ?? "",
          details: {
            label: info.label,
            scopeType: data.scopeType,
            scopeId: data.scopeId,
            actorName: actor.name,
            reason: data.reason,
            fromVersion: head.version,
            toVersion: version,
            ...(extra.revertOf ? { revertOf: extra.revertOf } : {}),
            changes,
            before,
            after,
          },
        },
        now,
      );
      const auditId = Number(sqlite.prepare("SELECT max(id) FROM audit_log").pluck().get());
      return { version, changes, auditId };
    })
    .immediate();
}

type AuditDetails = {
  scopeType?: ScopeType;
  scopeId?: number;
  actorName?: string;
  reason?: string;
  fromVersion?: number;
  toVersion?: number;
  revertOf?: number;
  changes?: RowChange[];
  before?: ThresholdRow[];
  after?: ThresholdRow[];
};

function targetOf(scopeType: ScopeType) {
  return scopeType === "model" ? "compressor_model" : "compressor";
}

/** Changes to one set, newest first. */
export function thresholdHistory(
  db: Db,
  scopeType: ScopeType,
  scopeId: number,
  actor: Pick<ThresholdActor, "siteIds">,
  limit = 100,
): ThresholdHistoryEntry[] | null {
  if (!visibleScope(db, scopeType, scopeId, actor)) return null;
  const rows = db
    .select({ id: auditLog.id, ts: auditLog.ts, actor: auditLog.actor, name: users.name, details: auditLog.details })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorUserId))
    .where(and(eq(auditLog.action, THRESHOLD_AUDIT_ACTION), eq(auditLog.targetType, targetOf(scopeType)), eq(auditLog.targetId, String(scopeId))))
    .orderBy(desc(auditLog.ts), desc(auditLog.id))
    .limit(limit)
    .all();
  return rows.map((r) => {
    const d = (r.details ?? {}) as AuditDetails;
    return {
      id: r.id,
      ts: r.ts,
      actor: d.actorName ?? r.name ?? r.actor,
      reason: d.reason ?? "",
      fromVersion: d.fromVersion ?? null,
      toVersion: d.toVersion ?? null,
      revertOf: d.revertOf ?? null,
      changes: d.changes ?? [],
      before: d.before ?? [],
      after: d.after ?? [],
    };
  });
}

/**
 * Puts a set back as it was before an earlier change: a save like any other (version-checked, validated against what
 * the set inherits now, audited), whose reason names the change it undoes.
 */
export function revertThresholdChange(
  db: Db,
  input: { auditId: number; baseVersion: number },
  actor: ThresholdActor,
  now = Date.now(),
): SaveThresholdsResult {
  const entry = db
    .select({ id: auditLog.id, ts: auditLog.ts, action: auditLog.action, details: auditLog.details, name: users.name, actor: auditLog.actor })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorUserId))
    .where(eq(auditLog.id, input.auditId))
    .get();
  const d = (entry?.details ?? null) as AuditDetails | null;
  if (!entry || entry.action !== THRESHOLD_AUDIT_ACTION || !d?.scopeType || !d.scopeId || !Array.isArray(d.before)) {
    throw new ThresholdRefusal(404, "No such threshold change.");
  }
  const who = d.actorName ?? entry.name ?? entry.actor;
  try {
    return saveThresholdSet(
      db,
      {
        scopeType: d.scopeType,
        scopeId: d.scopeId,
        baseVersion: input.baseVersion,
        reason: `Reverted change #${entry.id} (version ${d.fromVersion ?? "?"} → ${d.toVersion ?? "?"}, by ${who}): ${d.reason ?? ""}`.slice(0, 500),
        limits: d.before,
      },
      actor,
      now,
      { revertOf: entry.id },
    );
  } catch (e) {
    if (e instanceof ThresholdRefusal && e.status === 400 && e.fieldErrors) {
      const first = Object.values(e.fieldErrors)[0]?.[0];
      throw new ThresholdRefusal(
        400,
        `The earlier values no longer fit what this set inherits${first ? ` (${first})` : ""}. Edit the set instead.`,
      );
    }
    throw e;
  }
}
