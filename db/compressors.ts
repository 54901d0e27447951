import { and, asc, eq, gt, inArray } from "drizzle-orm";
import type { CompressorDto, CompressorInput, CompressorModelDto, CompressorModelInput } from "@/shared/compressor-schema";
import type { Db } from "./client";
import { compressorModels, compressors, sites } from "./schema";



const modelColumns = {
  id: compressorModels.id,
  name: compressorModels.name,
  maker: compressorModels.maker,
  stages: compressorModels.stages,
  ratedDeliveryLpm: compressorModels.ratedDeliveryLpm,
  ratedPressureBar: compressorModels.ratedPressureBar,
};

export function listModels(db: Db): CompressorModelDto[] {
  return db.select(modelColumns).from(compressorModels).orderBy(asc(compressorModels.name)).all();
}

export function getModel(db: Db, id: number): CompressorModelDto | null {
  return db.select(modelColumns).from(compressorModels).where(eq(compressorModels.id, id)).get() ?? null;
}

export function createModel(db: Db, input: CompressorModelInput, now = Date.now()): CompressorModelDto {
  return db.insert(compressorModels).values({ ...input, createdAt: now }).returning(modelColumns).get();
}

export function updateModel(db: Db, id: number, input: CompressorModelInput): CompressorModelDto | null {
  return db.update(compressorModels).set(input).where(eq(compressorModels.id, id)).returning(modelColumns).get() ?? null;
}

function compressorQuery(db: Db) {
  return db
    .select({
      id: compressors.id,
      name: compressors.name,
      serial: compressors.serial,
      deviceId: compressors.deviceId,
      siteId: compressors.siteId,
      siteName: sites.name,
      siteCode: sites.code,
      timeZone: sites.timeZone,
      modelId: compressors.modelId,
      modelName: compressorModels.name,
      stages: compressorModels.stages,
      ratedDeliveryLpm: compressorModels.ratedDeliveryLpm,
      ratedPressureBar: compressorModels.ratedPressureBar,
      stopPressureBar: compressors.stopPressureBar,
      restartPressureBar: compressors.restartPressureBar,
      bankVolumeL: compressors.bankVolumeL,
      inService: compressors.inService,
      deviceSecretHash: compressors.deviceSecretHash,
    })
    .from(compressors)
    .innerJoin(sites, eq(sites.id, compressors.siteId))
    .innerJoin(compressorModels, eq(compressorModels.id, compressors.modelId));
}

type CompressorQueryRow = Awaited<ReturnType<ReturnType<typeof compressorQuery>["all"]>>[number];

function toDto({ deviceSecretHash, ...rest }: CompressorQueryRow): CompressorDto {
  return { ...rest, hasDeviceCredential: deviceSecretHash != null };
}

/** siteIds null means every site. */
export function listCompressors(db: Db, siteIds: number[] | null): CompressorDto[] {
  const q = compressorQuery(db);
  return (siteIds ? q.where(inArray(compressors.siteId, siteIds)) : q)
    .orderBy(asc(sites.name), asc(compressors.name))
    .all()
    .map(toDto);
}

export function getCompressor(db: Db, id: number): CompressorDto | null {
  const row = compressorQuery(db).where(eq(compressors.id, id)).get();
  return row ? toDto(row) : null;
}

export function createCompressor(db: Db, input: CompressorInput, now = Date.now()): CompressorDto {
  const { id } = db
    .insert(compressors)
    .values({ ...input, createdAt: now, updatedAt: now })
    .returning({ id: compressors.id })
    .get();
  return getCompressor(db, id)!;
}

export function updateCompressor(db: Db, id: number, input: CompressorInput, now = Date.now()): CompressorDto | null {
  const row = db
    .update(compressors)
    .set({ ...input, updatedAt: now })
    .where(eq(compressors.id, id))
    .returning({ id: compressors.id })
    .get();
  return row ? getCompressor(db, row.id) : null;
}

export function setDeviceSecretHash(db: Db, id: number, hash: string, now = Date.now()): void {
  db.update(compressors).set({ deviceSecretHash: hash, updatedAt: now }).where(eq(compressors.id, id)).run();
}

/** Compressors of a model whose stop pressure lies above the given pressure (for a model's rated-pressure change). */
export function compressorsOfModelAbove(db: Db, modelId: number, pressureBar: number): { id: number; name: string; stopPressureBar: number }[] {
  return db
    .select({ id: compressors.id, name: compressors.name, stopPressureBar: compressors.stopPressureBar })
    .from(compressors)
    .where(and(eq(compressors.modelId, modelId), gt(compressors.stopPressureBar, pressureBar)))
    .orderBy(asc(compressors.name))
    .all();
}
