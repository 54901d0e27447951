import fs from "node:fs";
import type { Db } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { demoSites } from "@/db/demo-scenario";
import { writeDevicesFile, type DemoDevice } from "@/simulator/devices";

/** Device secrets kept from an earlier demo start, so the seed does not reissue them. */
export function readDeviceSecrets(file: string): Map<string, string> {
  try {
    const parsed = JSON.parse(fs.readFileSync(file, "utf8")) as { devices?: { deviceId: string; secret: string }[] };
    return new Map((parsed.devices ?? []).map((d) => [d.deviceId, d.secret]));
  } catch {
    return new Map();
  }
}

/** Writes the simulator's device list: every demo compressor with its plain secret. */
export function writeDemoDevices(db: Db, file: string, secrets: Map<string, string>): void {
  const profiles = new Map<string, DemoDevice["profile"]>(demoSites.map((s) => [s.code, s.profile]));
  const devices = listCompressors(db, null)
    .filter((c) => secrets.has(c.deviceId))
    .map((c) => ({
      deviceId: c.deviceId,
      secret: secrets.get(c.deviceId)!,
      siteCode: c.siteCode,
      timeZone: c.timeZone,
      compressorId: c.id,
      name: c.name,
      stages: c.stages,
      ratedDeliveryLpm: c.ratedDeliveryLpm,
      ratedPressureBar: c.ratedPressureBar,
      stopPressureBar: c.stopPressureBar,
      restartPressureBar: c.restartPressureBar,
      bankVolumeL: c.bankVolumeL,
      profile: profiles.get(c.siteCode) ?? "industrial",
    }));
  writeDevicesFile(file, { devices });
}
