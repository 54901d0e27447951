import { getDb } from "@/db/client";
import { getCompressor } from "@/db/compressors";
import { inScope, requirePermission } from "@/lib/auth/current-user";
import { compressorIdSchema } from "@/shared/board";
import type { CompressorDto } from "@/shared/compressor-schema";

/**
 * The compressor named in the path, if the caller may view it. A compressor outside the caller's sites answers
 * exactly like one that does not exist (404), so ids of other sites cannot be probed.
 */
export async function viewableCompressor(params: Promise<{ id: string }>): Promise<CompressorDto | null> {
  const user = await requirePermission("compressors.view");
  const id = compressorIdSchema.safeParse((await params).id);
  if (!id.success) return null;
  const compressor = getCompressor(getDb(), id.data);
  if (!compressor || !inScope(user, compressor.siteId)) return null;
  return compressor;
}

