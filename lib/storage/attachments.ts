import { Readable } from "node:stream";
import type { Db } from "@/db/client";
import { attachmentDto, findStoredDuplicate, getAttachment, insertAttachment, listAttachments } from "@/db/attachments";
import { writeAudit } from "@/db/audit";
import { uploadRejections, type AttachmentDto, type AttachmentOwner, type UploadRejection } from "@/shared/attachment-schema";
import { can, denialReason, type Role } from "@/shared/roles";
import type { ObjectStore } from "./object-store";
import { attachmentOwners } from "./owners";
import { receiveUpload } from "./upload";

// Attaching, listing and reading files, with the owner's permission and site scope checked first every time.
// Anything outside the person's sites answers like something that does not exist.

// Kept free of the sign-in machinery (next-auth), so programs outside the web app can use it too.
type Who = { id: number; name: string; email: string; role: Role; siteIds: number[] | null };

export class AttachmentNotFound extends Error {}

/** The person's role may not do this with the owner's kind of record (403, with the permission table's sentence). */
export class AttachmentForbidden extends Error {
  readonly status = 403;
}

const inScope = (user: Who, siteId: number) => user.siteIds === null || user.siteIds.includes(siteId);

const rejectionStatus: Record<UploadRejection, number> = {
  empty: 400,
  oversize: 413,
  type: 415,
  truncated: 400,
  malformed: 400,
  "no-file": 400,
  "too-many": 400,
  "not-multipart": 400,
  busy: 503,
  "store-down": 503,
};

export type UploadResult =
  | { status: 200 | 201; attachment: AttachmentDto; duplicate: boolean; notice: string | null }
  | { status: number; error: string; reason: UploadRejection; attachment: AttachmentDto | null };

/** The owner's place, when it exists and the person may see it; AccessError or AttachmentNotFound otherwise. */
function locateFor(db: Db, user: Who, owner: AttachmentOwner, permission: "upload" | "view") {
  const spec = attachmentOwners[owner.ownerKind];
  const needed = permission === "upload" ? spec.uploadPermission : spec.viewPermission;
  if (!can(user.role, needed)) throw new AttachmentForbidden(denialReason(needed));
  const where = spec.locate(db, owner.ownerId);
  if (!where || !inScope(user, where.siteId)) throw new AttachmentNotFound();
  return { spec, where };
}

/** Streams the request's one file into the store and records it against its owner. */
export async function uploadAttachment(db: Db, store: ObjectStore, user: Who, owner: AttachmentOwner, request: Request): Promise<UploadResult> {
  const { spec, where } = locateFor(db, user, owner, "upload");
  const outcome = await receiveUpload(request, store, { keyPrefix: owner.ownerKind });
  const base = { ownerKind: owner.ownerKind, ownerId: owner.ownerId, compressorId: where.compressorId, siteId: where.siteId };
  const audit = (action: string, details: Record<string, unknown>, now: number) =>
    writeAudit(
      db,
      {
        actorUserId: user.id,
        actor: user.email,
        action,
        targetType: owner.ownerKind,
        targetId: owner.ownerId,
        siteId: where.siteId,
        compressorId: where.compressorId,
        eventKind: spec.eventKind,
        details: { label: `${spec.label} ${owner.ownerId}`, ...details },
      },
      now,
    );
  const now = Date.now();

  if (!outcome.ok) {
    const name = outcome.name ?? "";
    // The record stays and says its file did not arrive; refusals of the file itself are answered and counted only.
    const keepFailure = outcome.reason === "store-down" || outcome.reason === "truncated";
    const row = db.transaction(
      () => {
        audit("attachment.rejected", { reason: outcome.reason, name, ...(outcome.detail ? { detail: outcome.detail } : {}) }, now);
        if (!keepFailure || !name) return null;
        return insertAttachment(db, { ...base, status: "failed", key: null, name, error: uploadRejections[outcome.reason], uploadedBy: user.id, uploadedByName: user.name, uploadedAt: now });
      },
      { behavior: "immediate" },
    );
    console.warn(`[storage] upload to ${owner.ownerKind} ${owner.ownerId} refused (${outcome.reason})${outcome.detail ? `: ${outcome.detail}` : ""}`);
    return { status: rejectionStatus[outcome.reason], error: uploadRejections[outcome.reason], reason: outcome.reason, attachment: row ? attachmentDto(row) : null };
  }

  const f = outcome.file;
  const result = db.transaction(
    () => {
      const existing = findStoredDuplicate(db, owner.ownerKind, owner.ownerId, f.sha256);
      if (existing) return { row: existing, duplicate: true };
      const row = insertAttachment(db, {
        ...base,
        status: "stored",
        key: f.key,
        name: f.name,
        contentType: f.contentType,
        size: f.size,
        sha256: f.sha256,
        uploadedBy: user.id,
        uploadedByName: user.name,
        uploadedAt: now,
      });
      audit("attachment.upload", { attachmentId: row.id, name: f.name, contentType: f.contentType, size: f.size, sha256: f.sha256, ...(f.nameChanged ? { nameCleaned: true } : {}) }, now);
      return { row, duplicate: false };
    },
    { behavior: "immediate" },
  );
  if (result.duplicate) await store.remove(f.key).catch(() => undefined);
  return {
    status: result.duplicate ? 200 : 201,
    attachment: attachmentDto(result.row),
    duplicate: result.duplicate,
    notice: result.duplicate
      ? `This file is already attached as “${result.row.name}”.`
      : f.nameChanged
        ? `The file name was cleaned to “${f.name}”.`
        : null,
  };
}

export function listOwnerAttachments(db: Db, user: Who, owner: AttachmentOwner): AttachmentDto[] {
  locateFor(db, user, owner, "view");
  return listAttachments(db, owner.ownerKind, [owner.ownerId]).map(attachmentDto);
}

export type OpenedAttachment = { attachment: AttachmentDto; body: ReadableStream<Uint8Array> };

/** The file's bytes for a person allowed to read its owner; AttachmentNotFound for anything else they may not see. */
export async function openAttachment(db: Db, store: ObjectStore, user: Who, id: number): Promise<OpenedAttachment> {
  const row = getAttachment(db, id);
  if (!row || !(row.ownerKind in attachmentOwners)) throw new AttachmentNotFound();
  const spec = attachmentOwners[row.ownerKind as keyof typeof attachmentOwners];
  if (!can(user.role, spec.viewPermission)) throw new AttachmentForbidden(denialReason(spec.viewPermission));
  if (!inScope(user, row.siteId) || row.status !== "stored" || !row.key) throw new AttachmentNotFound();
  const obj = await store.get(row.key);
  if (!obj) {
    console.error(`[storage] attachment ${row.id} (${row.key}) is missing from the store`);
    throw new AttachmentNotFound();
  }
  return { attachment: attachmentDto(row), body: Readable.toWeb(obj.body) as unknown as ReadableStream<Uint8Array> };
}

/** Content-Disposition with an ASCII fallback and the UTF-8 name (RFC 6266 / RFC 8187). */
export function contentDisposition(name: string, inline: boolean): string {
  const ascii = name.replace(/[^\x20-\x7e]/g, "_").replace(/["\\]/g, "_");
  return `${inline ? "inline" : "attachment"}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(name)}`;
}
