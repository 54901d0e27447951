import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { errorJson, route } from "@/lib/api/route";
import { requireUser } from "@/lib/auth/current-user";
import { AttachmentForbidden, AttachmentNotFound, listOwnerAttachments, uploadAttachment } from "@/lib/storage/attachments";
import { getObjectStore } from "@/lib/storage/object-store";
import { attachmentOwnerSchema } from "@/shared/attachment-schema";

export const dynamic = "force-dynamic";

const noStore = { "cache-control": "no-store" };

function ownerFrom(request: Request) {
  const q = new URL(request.url).searchParams;
  return attachmentOwnerSchema.parse({ ownerKind: q.get("ownerKind"), ownerId: q.get("ownerId") });
}

/** GET ?ownerKind=service_log&ownerId=12: the record's attachments. */
export const GET = route(async (request: Request) => {
  const user = await requireUser();
  const owner = ownerFrom(request);
  try {
    return NextResponse.json({ attachments: listOwnerAttachments(getDb(), user, owner) }, { headers: noStore });
  } catch (e) {
    if (e instanceof AttachmentNotFound) return errorJson(404, "No such record.");
    if (e instanceof AttachmentForbidden) return errorJson(403, e.message);
    throw e;
  }
});

/** POST ?ownerKind=service_log&ownerId=12 with one file as multipart/form-data (streamed; at most 20 MB; images and PDF). */
export const POST = route(async (request: Request) => {
  const user = await requireUser();
  const owner = ownerFrom(request);
  try {
    const r = await uploadAttachment(getDb(), getObjectStore(), user, owner, request);
    return NextResponse.json(r, { status: r.status, headers: noStore });
  } catch (e) {
    if (e instanceof AttachmentNotFound) return errorJson(404, "No such record.");
    if (e instanceof AttachmentForbidden) return errorJson(403, e.message);
    throw e;
  }
});
