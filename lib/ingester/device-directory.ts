import type { Statement } from "better-sqlite3";
import type { Db } from "@/db/client";

export type DirectoryEntry = {
  compressorId: number;
  deviceId: string;
  siteId: number;
  siteCode: string;
  /** The model's rated pressure, bar: what its pressures are judged against. */
  ratedPressureBar: number;
};

export type DeviceDirectory = {
  byDeviceId(deviceId: string): DirectoryEntry | undefined;
  byCompressorId(compressorId: number): DirectoryEntry | undefined;
  all(): DirectoryEntry[];
  reload(): void;
};

/** Compressors by device id, reloaded periodically and (rate-limited) when an unknown device id shows up. */
export function createDeviceDirectory(db: Db, opts: { refreshMs?: number; missReloadMs?: number } = {}): DeviceDirectory & {
  close(): void;
} {
  const select = db.$client.prepare(
    `SELECT c.id AS compressorId, c.device_id AS deviceId, c.site_id AS siteId, s.code AS siteCode,
       m.rated_pressure_bar AS ratedPressureBar
     FROM compressors c JOIN sites s ON s.id = c.site_id JOIN compressor_models m ON m.id = c.model_id ORDER BY c.id`,
  ) as Statement<[], DirectoryEntry>;
  const missReloadMs = opts.missReloadMs ?? 5_000;
  let byDevice = new Map<string, DirectoryEntry>();
  let byId = new Map<number, DirectoryEntry>();
  let loadedAt = 0;
  const reload = () => {
    const rows = select.all();
    byDevice = new Map(rows.map((r) => [r.deviceId, r]));
    byId = new Map(rows.map((r) => [r.compressorId, r]));
    loadedAt = Date.now();
  };
  reload();
  const timer = setInterval(reload, opts.refreshMs ?? 30_000);
  timer.unref();
  return {
    byDeviceId(deviceId) {
      const e = byDevice.get(deviceId);
      if (e || Date.now() - loadedAt < missReloadMs) return e;
      reload();
      return byDevice.get(deviceId);
    },
    byCompressorId: (id) => byId.get(id),
    all: () => [...byId.values()],
    reload,
    close: () => clearInterval(timer),
  };
}
