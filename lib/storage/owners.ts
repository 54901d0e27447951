import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { airTests, cartridgeChanges, serviceLog } from "@/db/schema";
import type { AttachmentOwnerKind } from "@/shared/attachment-schema";
import type { Permission } from "@/shared/roles";

/**
 * What may own attachments, who may attach and read them, and where the owner lives (its compressor and site, for the
 * site scope). To attach files to another kind of record, add its kind to shared/attachment-schema.ts and a line here.
 */
export type AttachmentOwnerSpec = {
  /** Words for the event log: "service entry 12". */
  label: string;
  /** Event-log kind of upload entries. */
  eventKind: string;
  uploadPermission: Permission;
  viewPermission: Permission;
  locate(db: Db, ownerId: number): { compressorId: number; siteId: number } | null;
};

export const attachmentOwners: Record<AttachmentOwnerKind, AttachmentOwnerSpec> = {
  service_log: {
    label: "service entry",
    eventKind: "service",
    uploadPermission: "service.log",
    viewPermission: "service.view",
    locate: (db, id) =>
      db.select({ compressorId: serviceLog.compressorId, siteId: serviceLog.siteId }).from(serviceLog).where(eq(serviceLog.id, id)).get() ?? null,
  },
  air_test: {
    label: "air test",
    eventKind: "air-test",
    uploadPermission: "airquality.record",
    viewPermission: "airquality.view",
    locate: (db, id) => db.select({ compressorId: airTests.compressorId, siteId: airTests.siteId }).from(airTests).where(eq(airTests.id, id)).get() ?? null,
  },
  cartridge_change: {
    label: "cartridge change",
    eventKind: "service",
    uploadPermission: "airquality.record",
    viewPermission: "airquality.view",
    locate: (db, id) =>
      db.select({ compressorId: cartridgeChanges.compressorId, siteId: cartridgeChanges.siteId }).from(cartridgeChanges).where(eq(cartridgeChanges.id, id)).get() ?? null,
  },
};
