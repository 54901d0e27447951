/**
 * An air-test record or cartridge change together with its file (certificate, photo), all or nothing: the record is
 * checked first, then the file is streamed into the store (type sniffed, size capped), then record and attachment row
 * are written in one transaction. A refused file refuses the record, with the reason at the file's field; if the
 * transaction fails the stored object is removed again.
 */
import { insertAttachment } from "@/db/attachments";
import { writeAudit } from "@/db/audit";
import type { Db } from "@/db/client";
import type { ObjectStore } from "@/lib/storage/object-store";
import { receiveUpload, type StoredFile } from "@/lib/storage/upload";
import type { AirTestInput, CartridgeChangeInput } from "@/shared/air-quality-schema";
import { uploadRejections } from "@/shared/attachment-schema";
import { AirQualityRefusal, checkAirTest, recordAirTest, recordCartridgeChange, type Actor, type RecordedTest } from "./service";

type Who = Actor & { email: string; siteIds: number[] | null };

async function receiveOptional(request: Request | null, store: ObjectStore, field: string, keyPrefix: string): Promise<StoredFile | null> {
  if (!request) return null;
  const outcome = await receiveUpload(request, store, { keyPrefix });
  if (outcome.ok) return outcome.file;
  if (outcome.reason === "no-file") return null;
  const status = outcome.reason === "busy" || outcome.reason === "store-down" ? 503 : 400;
  throw new AirQualityRefusal(status as 400, `${uploadRejections[outcome.reason]} Nothing was saved.`, { [field]: [uploadRejections[outcome.reason]] });
}

function attachRow(db: Db, who: Who, ownerKind: "air_test" | "cartridge_change", ownerId: number, where: { compressorId: number; siteId: number }, f: StoredFile, now: number): number {
  const row = insertAttachment(db, {
    ownerKind,
    ownerId,
    compressorId: where.compressorId,
    siteId: where.siteId,
    status: "stored",
    key: f.key,
    name: f.name,
    contentType: f.contentType,
    size: f.size,
    sha256: f.sha256,
    uploadedBy: who.id,
    uploadedByName: who.name,
    uploadedAt: now,
  });
  writeAudit(
    db,
    {
      actorUserId: who.id,
      actor: who.email,
      action: "attachment.upload",
      targetType: ownerKind,
      targetId: ownerId,
      siteId: where.siteId,
      compressorId: where.compressorId,
      details: { attachmentId: row.id, name: f.name, contentType: f.contentType, size: f.size, sha256: f.sha256 },
    },
    now,
  );
  return row.id;
}

export async function recordAirTestWithCertificate(db: Db, store: ObjectStore, who: Who, input: AirTestInput, request: Request | null): Promise<RecordedTest> {
  const { unit } = checkAirTest(db, input, who.siteIds);
  const file = await receiveOptional(request, store, "certificate", "air_test");
  try {
    return recordAirTest(db, input, who, who.siteIds, {
      attach: file
        ? (tx, id) => {
            const attachmentId = attachRow(tx, who, "air_test", id, { compressorId: unit.id, siteId: unit.siteId }, file, Date.now());
            tx.$client.prepare("UPDATE air_tests SET certificate_attachment_id = ? WHERE id = ?").run(attachmentId, id);
          }
        : undefined,
    });
  } catch (e) {
    if (file) await store.remove(file.key).catch(() => undefined);
    throw e;
  }
}

export async function recordCartridgeChangeWithPhoto(db: Db, store: ObjectStore, who: Who, input: CartridgeChangeInput, request: Request | null): Promise<{ id: number }> {
  const file = await receiveOptional(request, store, "photo", "cartridge_change");
  try {
    return recordCartridgeChange(db, input, who, who.siteIds, {
      attach: file
        ? (tx, id, where) => {
            const attachmentId = attachRow(tx, who, "cartridge_change", id, where, file, Date.now());
            tx.$client.prepare("UPDATE cartridge_changes SET photo_attachment_id = ? WHERE id = ?").run(attachmentId, id);
          }
        : undefined,
    });
  } catch (e) {
    if (file) await store.remove(file.key).catch(() => undefined);
    throw e;
  }
}
