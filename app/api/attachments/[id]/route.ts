import { getDb } from "@/db/client";
import { errorJson, route } from "@/lib/api/route";
import { requireUser } from "@/lib/auth/current-user";
import { AttachmentForbidden, AttachmentNotFound, contentDisposition, openAttachment } from "@/lib/storage/attachments";
import { getObjectStore } from "@/lib/storage/object-store";
import { attachmentIdSchema } from "@/shared/attachment-schema";

export const dynamic = "force-dynamic";

/** The file, streamed from the store through the app; ?download=1 asks the browser to save it rather than show it. */
export const GET = route(async (request: Request, ctx: { params: Promise<{ id: string }> }) => {
  const user = await requireUser();
  const id = attachmentIdSchema.safeParse((await ctx.params).id);
  if (!id.success) return errorJson(404, "No such file.");
  try {
    const { attachment, body } = await openAttachment(getDb(), getObjectStore(), user, id.data);
    const inline = new URL(request.url).searchParams.get("download") !== "1";
    return new Response(body, {
      headers: {
        "content-type": attachment.contentType,
        "content-length": String(attachment.size),
        "content-disposition": contentDisposition(attachment.name, inline),
        "cache-control": "private, no-store",
        "x-content-type-options": "nosniff",
        "content-security-policy": "sandbox; default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; object-src 'self'",
      },
    });
  } catch (e) {
    if (e instanceof AttachmentNotFound) return errorJson(404, "No such file.");
    if (e instanceof AttachmentForbidden) return errorJson(403, e.message);
    throw e;
  }
});
