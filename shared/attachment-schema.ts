import { z } from "zod";

/** Records that can own attachments. Another area adds its kind here and its owner in lib/storage/owners.ts. */
export const attachmentOwnerKinds = ["service_log", "air_test", "cartridge_change"] as const;
export const attachmentOwnerKindSchema = z.enum(attachmentOwnerKinds);
export type AttachmentOwnerKind = z.infer<typeof attachmentOwnerKindSchema>;

export const MAX_ATTACHMENT_BYTES = 20 * 1024 * 1024;
export const MAX_ATTACHMENT_NAME = 200;

/** Content types accepted, as sniffed from the bytes (never the browser's claim), with the extension they are kept under. */
export const attachmentTypes: Record<string, string> = {
  "image/jpeg": "jpg",
  "image/png": "png",
  "image/webp": "webp",
  "image/gif": "gif",
  "image/heic": "heic",
  "image/heif": "heif",
  "image/avif": "avif",
  "application/pdf": "pdf",
};
export const attachmentAccept = "image/jpeg,image/png,image/webp,image/gif,image/heic,image/heif,image/avif,application/pdf";

export const attachmentOwnerSchema = z.object({
  ownerKind: attachmentOwnerKindSchema,
  ownerId: z.coerce.number().int().positive(),
});
export type AttachmentOwner = z.infer<typeof attachmentOwnerSchema>;

export const attachmentIdSchema = z.coerce.number().int().positive().max(2 ** 31);

export type AttachmentDto = {
  id: number;
  ownerKind: string;
  ownerId: number;
  status: "stored" | "failed";
  name: string;
  contentType: string;
  size: number;
  sha256: string | null;
  error: string | null;
  uploadedByName: string;
  uploadedAt: number;
};

/** Why an upload was refused; each is counted (audit action attachment.rejected) and answered with its sentence. */
export const uploadRejections = {
  empty: "The file is empty.",
  oversize: `The file is larger than ${MAX_ATTACHMENT_BYTES / 1024 / 1024} MB.`,
  type: "Only photos (JPEG, PNG, WebP, GIF, HEIC, AVIF) and PDF documents can be attached; this file's contents are neither.",
  malformed: "The upload could not be read as a form with one file (a file name with control characters, or a damaged request). Nothing was kept.",
  truncated: "The upload was cut off before the file was complete. Nothing was kept; try again.",
  "no-file": "No file was sent.",
  "too-many": "Send one file per upload.",
  "not-multipart": "Send the file as multipart/form-data.",
  busy: "Too many uploads are running at the moment. Try again in a minute.",
  "store-down": "The file store cannot be reached, so the file was not kept. The record itself is saved; attach the file again later.",
} as const;
export type UploadRejection = keyof typeof uploadRejections;

/**
 * The person's file name as kept for display: the last path segment only, no control or bidi-override characters,
 * NFC, at most MAX_ATTACHMENT_NAME characters. `changed` tells whether anything had to go.
 */
export function sanitizeFileName(raw: string): { name: string; changed: boolean } {
  const lastSegment = raw.split(/[/\\]/).pop() ?? "";
  // C0/C1 controls, DEL, and the Unicode bidi overrides that can disguise an extension.
  let name = lastSegment.normalize("NFC").replace(/[\u0000-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/g, "").trim();
  name = name.replace(/^\.+/, "");
  if (name.length > MAX_ATTACHMENT_NAME) {
    const dot = name.lastIndexOf(".");
    const ext = dot > 0 && name.length - dot <= 10 ? name.slice(dot) : "";
    name = name.slice(0, MAX_ATTACHMENT_NAME - ext.length) + ext;
  }
  if (!name) name = "attachment";
  return { name, changed: name !== raw };
}
