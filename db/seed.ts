import { randomBytes } from "node:crypto";
import bcrypt from "bcryptjs";
import { eq } from "drizzle-orm";
import type { Db } from "./client";
import { seedDemoContacts } from "./contacts";
import { DEMO_PASSWORD, demoCompressors, demoEmail, demoModels, demoOrganisation, demoSites, demoUsers } from "./demo-scenario";
import { seedDemoService } from "./demo-service";
import { seedDemoThresholds } from "./demo-thresholds";
import { compressorModels, compressors, settings, sites, users, userSites } from "./schema";

export type SeedResult = {
  created: { sites: number; models: number; compressors: number; users: number; credentials: number };
  /** deviceId → plain device secret, for the simulator. */
  deviceSecrets: Map<string, string>;
};

/**
 * Adds the demo organisation where it is missing; running it again changes nothing.
 * knownSecrets are device secrets kept from an earlier run; a secret that no longer matches is replaced.
 */
export function seedDemo(db: Db, knownSecrets: Map<string, string> = new Map(), now = Date.now()): SeedResult {
  const created = { sites: 0, models: 0, compressors: 0, users: 0, credentials: 0 };
  const deviceSecrets = new Map<string, string>();
  let passwordHash: string | undefined;

  db.transaction((tx) => {
    const siteIds = new Map<string, number>();
    for (const s of demoSites) {
      let row = tx.select({ id: sites.id }).from(sites).where(eq(sites.code, s.code)).get();
      if (!row) {
        row = tx
          .insert(sites)
          .values({ code: s.code, name: s.name, timeZone: s.timeZone, address: s.address, createdAt: now })
          .returning({ id: sites.id })
          .get();
        created.sites++;
      }
      siteIds.set(s.code, row.id);
    }

    const modelIds = new Map<string, number>();
    for (const m of demoModels) {
      let row = tx.select({ id: compressorModels.id }).from(compressorModels).where(eq(compressorModels.name, m.name)).get();
      if (!row) {
        row = tx.insert(compressorModels).values({ ...m, createdAt: now }).returning({ id: compressorModels.id }).get();
        created.models++;
      }
      modelIds.set(m.name, row.id);
    }

    for (const c of demoCompressors) {
      let row = tx
        .select({ id: compressors.id, hash: compressors.deviceSecretHash })
        .from(compressors)
        .where(eq(compressors.deviceId, c.deviceId))
        .get();
      if (!row) {
        row = tx
          .insert(compressors)
          .values({
            siteId: siteIds.get(c.site)!,
            modelId: modelIds.get(c.model)!,
            name: c.name,
            serial: c.serial,
            deviceId: c.deviceId,
            stopPressureBar: c.stopPressureBar,
            restartPressureBar: c.restartPressureBar,
            bankVolumeL: c.bankVolumeL,
            createdAt: now,
            updatedAt: now,
          })
          .returning({ id: compressors.id, hash: compressors.deviceSecretHash })
          .get();
        created.compressors++;
      }
      const known = knownSecrets.get(c.deviceId);
      if (known && row.hash && bcrypt.compareSync(known, row.hash)) {
        deviceSecrets.set(c.deviceId, known);
        continue;
      }
      const secret = randomBytes(18).toString("base64url");
      tx.update(compressors)
        .set({ deviceSecretHash: bcrypt.hashSync(secret, 10), updatedAt: now })
        .where(eq(compressors.id, row.id))
        .run();
      deviceSecrets.set(c.deviceId, secret);
      created.credentials++;
    }

    for (const u of demoUsers) {
      const email = demoEmail(u.role);
      if (tx.select({ id: users.id }).from(users).where(eq(users.email, email)).get()) continue;
      const row = tx
        .insert(users)
        .values({ email, name: u.name, role: u.role, passwordHash: (passwordHash ??= bcrypt.hashSync(DEMO_PASSWORD, 11)), allSites: !u.sites?.length, createdAt: now, updatedAt: now })
        .returning({ id: users.id })
        .get();
      for (const code of u.sites ?? []) tx.insert(userSites).values({ userId: row.id, siteId: siteIds.get(code)! }).run();
      created.users++;
    }

    tx.insert(settings).values({ key: "organisation.name", value: demoOrganisation, updatedAt: now }).onConflictDoNothing().run();
  }, { behavior: "immediate" });
  seedDemoThresholds(db, now);
  seedDemoContacts(db, now);
  seedDemoService(db, now);

  return { created, deviceSecrets };
}
