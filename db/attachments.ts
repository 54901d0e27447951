import { and, asc, eq, inArray } from "drizzle-orm";
import type { AttachmentDto } from "@/shared/attachment-schema";
import type { Db } from "./client";
import { attachments, type AttachmentRow } from "./schema";

export type NewAttachment = Omit<typeof attachments.$inferInsert, "id">;

export function insertAttachment(db: Db, a: NewAttachment): AttachmentRow {
  return db.insert(attachments).values(a).returning().get();
}

export function getAttachment(db: Db, id: number): AttachmentRow | null {
  return db.select().from(attachments).where(eq(attachments.id, id)).get() ?? null;
}

/** A file with the same bytes already kept for the same record (a repeated submit). */
export function findStoredDuplicate(db: Db, ownerKind: string, ownerId: number, sha256: string): AttachmentRow | null {
  return (
    db
      .select()
      .from(attachments)
      .where(and(eq(attachments.ownerKind, ownerKind), eq(attachments.ownerId, ownerId), eq(attachments.sha256, sha256), eq(attachments.status, "stored")))
      .get() ?? null
  );
}

export function listAttachments(db: Db, ownerKind: string, ownerIds: readonly number[]): AttachmentRow[] {
  if (ownerIds.length === 0) return [];
  return db
    .select()
    .from(attachments)
    .where(and(eq(attachments.ownerKind, ownerKind), inArray(attachments.ownerId, [...ownerIds])))
    .orderBy(asc(attachments.id))
    .all();
}

export function attachmentDto(r: AttachmentRow): AttachmentDto {
  return {
    id: r.id,
    ownerKind: r.ownerKind,
    ownerId: r.ownerId,
    status: r.status,
    name: r.name,
    contentType: r.contentType,
    size: r.size,
    sha256: r.sha256,
    error: r.error,
    uploadedByName: r.uploadedByName,
    uploadedAt: r.uploadedAt,
  };
}
