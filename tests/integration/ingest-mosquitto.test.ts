import { type ChildProcess, execFileSync, spawn } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { INGEST_USERNAME } from "@/lib/broker/ingest-credential";
import { type Ingester, startIngester } from "@/lib/ingester/ingester";
import {
  connectDevice,
  count,
  type FleetDevice,
  freePort,
  makeTempDb,
  seedFleet,
  type TempDb,
  telemetry,
  topicOf,
  waitFor,
} from "./ingest-fixtures";

// Debian's Mosquitto stands in for "any standard broker" reached through MQTT_URL: per-device passwords and
// ACLs in its own files, persistence on disk, and its default of 20 unacknowledged messages per client.
const MOSQUITTO = "/usr/sbin/mosquitto";
const INGEST_PASSWORD = "ingest-password-for-tests-0123456789";
const available = fs.existsSync(MOSQUITTO);

let t: TempDb;
let dev: Map<string, FleetDevice>;
let port: number;
let conf: string;
let proc: ChildProcess | null = null;
let ingester: Ingester | null = null;

function writeConfig(dir: string) {
  const passwd = path.join(dir, "passwd");
  const users: [string, string][] = [
    [INGEST_USERNAME, INGEST_PASSWORD],
    ...[...dev.values()].map((d) => [d.deviceId, d.secret!] as [string, string]),
    ["ghost-1", "ghost-secret"],
  ];
  fs.writeFileSync(passwd, users.map(([u, p]) => `${u}:${p}`).join("\n") + "\n", { mode: 0o600 });
  execFileSync("/usr/bin/mosquitto_passwd", ["-U", passwd]);
  const acl = [
    `user ${INGEST_USERNAME}`,
    "topic read airkeep/v1/#",
    ...[...dev.values()].flatMap((d) => [`user ${d.deviceId}`, `topic write airkeep/v1/${d.siteCode}/${d.deviceId}/+`]),
    "user ghost-1",
    "topic write airkeep/v1/north/ghost-1/+",
  ];
  fs.writeFileSync(path.join(dir, "acl"), acl.join("\n") + "\n", { mode: 0o600 });
  conf = path.join(dir, "mosquitto.conf");
  fs.writeFileSync(
    conf,
    [
      `listener ${port} 127.0.0.1`,
      "allow_anonymous false",
      `password_file ${passwd}`,
      `acl_file ${path.join(dir, "acl")}`,
      "persistence true",
      `persistence_location ${dir}/`,
      "log_dest none",
      ...(process.getuid?.() === 0 ? ["user root"] : []),
    ].join("\n") + "\n",
  );
}

async function startMosquitto() {
  proc = spawn(MOSQUITTO, ["-c", conf], { stdio: "ignore" });
  for (let i = 0; i < 100; i++) {
    const ok = await new Promise<boolean>((resolve) => {
      const s = net.connect(port, "127.0.0.1", () => {
        s.destroy();
        resolve(true);
      });
      s.on("error", () => resolve(false));
    });
    if (ok) return;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error("mosquitto did not start");
}

async function stopMosquitto() {
  const p = proc;
  proc = null;
  if (!p || p.exitCode !== null) return;
  const exited = new Promise((r) => p.once("exit", r));
  process.kill(p.pid!, "SIGTERM"); // Mosquitto saves its persistence file on a clean exit.
  await exited;
}

async function startIngest(protocolVersion: 4 | 5 = 4) {
  ingester = await startIngester({
    db: t.db,
    mqttUrl: `mqtt://127.0.0.1:${port}`,
    password: INGEST_PASSWORD,
    protocolVersion,
    live: null,
    log: () => {},
  });
  await waitFor(() => ingester!.stats().connected, 5_000, "ingester connected");
}

const stored = (d: FleetDevice) => count(t.db, "SELECT count(*) AS n FROM readings WHERE compressor_id = ?", d.compressorId);

describe.skipIf(!available)("ingesting through Mosquitto (MQTT_URL)", () => {
  beforeAll(async () => {
    t = makeTempDb("airkeep-mosquitto-");
    dev = seedFleet(t.db, {
      sites: ["north"],
      devices: [
        { deviceId: "hp-1", siteCode: "north" },
        { deviceId: "hp-2", siteCode: "north" },
      ],
    }).devices;
    port = await freePort();
    writeConfig(t.dir);
    await startMosquitto();
    await startIngest();
  });
  afterAll(async () => {
    await ingester?.close();
    await stopMosquitto();
    t?.cleanup();
  });

  it("stores readings and refuses a device Mosquitto knows but Airkeep does not", async () => {
    const d = dev.get("hp-1")!;
    const c = await connectDevice(`mqtt://127.0.0.1:${port}`, d);
    // Well before the readings of the last test, which must come later by both seq and time (the sequence rule).
    await c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: Date.now() - 600_000 })), { qos: 1 });
    await waitFor(() => stored(d) === 1, 5_000, "row");
    const ghost = await connectDevice(`mqtt://127.0.0.1:${port}`, { deviceId: "ghost-1", secret: "ghost-secret" });
    const before = ingester!.stats().rejects.unknownDevice;
    await ghost.publishAsync("airkeep/v1/north/ghost-1/telemetry", JSON.stringify(telemetry()), { qos: 1 });
    await waitFor(() => ingester!.stats().rejects.unknownDevice === before + 1, 5_000, "unknown device counted");
    await c.endAsync();
    await ghost.endAsync();
  });

  it.each([
    [4, 900],
    [5, 5_000],
  ] as const)("keeps pace with Mosquitto's default limits over MQTT %i (3.1.1 allows only 20 in flight: commits on a lull)", async (version, n) => {
    await ingester?.close();
    await startIngest(version);
    const d = dev.get("hp-2")!;
    const c = await connectDevice(`mqtt://127.0.0.1:${port}`, d);
    const before = stored(d);
    // Each run later than the one before, by time and by seq (the sequence rule).
    const base = Date.now() - 3_600_000 * (6 - version);
    const t0 = Date.now();
    await Promise.all(
      Array.from({ length: n }, (_, i) =>
        c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: base + i * 100, seq: version * 100_000 + i })), { qos: 1 }),
      ),
    );
    await waitFor(() => stored(d) === before + n, 10_000, `all rows (have ${stored(d) - before})`);
    console.log(`MQTT ${version}: ${n} readings in ${Date.now() - t0} ms`);
    expect(Date.now() - t0).toBeLessThan(3_000);
    await c.endAsync();
  });

  it("loses no QoS 1 reading across a Mosquitto restart while the ingester is away (persistent session on disk)", async () => {
    const d = dev.get("hp-1")!;
    await ingester!.close();
    ingester = null;
    const c = await connectDevice(`mqtt://127.0.0.1:${port}`, d);
    const base = Date.now() - 120_000;
    for (let i = 0; i < 40; i++) {
      await c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: base + i * 1_000, seq: 1_000 + i })), { qos: 1 });
    }
    await c.endAsync();
    const before = stored(d);
    await stopMosquitto();
    await startMosquitto();
    await startIngest();
    await waitFor(() => stored(d) === before + 40, 5_000, "queued readings after the restart");
    const seqs = t.db.$client
      .prepare("SELECT seq FROM readings WHERE compressor_id = ? AND seq >= 1000 ORDER BY seq")
      .pluck()
      .all(d.compressorId);
    expect(seqs).toEqual(Array.from({ length: 40 }, (_, i) => 1_000 + i));
  });
});
