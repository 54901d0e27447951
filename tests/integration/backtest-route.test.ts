import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import type { Db } from "@/db/client";
import { createReadingStore } from "@/db/readings";
import { createSession } from "@/db/sessions";
import type { Role } from "@/shared/roles";
import type { BacktestMessage } from "@/shared/backtest";
import { makeTempDb, modelLimits, reading, seedFleet, type Fleet, type TempDb } from "./alarms-fixtures";

// The streamed backtest route, called as the page calls it: NDJSON progress lines, then the result; refused for a
// role without thresholds.view and for a compressor outside the person's sites.

const session = vi.hoisted(() => ({ current: null as { uid: number; sid: string } | null }));
vi.mock("next-auth", async (importOriginal) => ({
  ...(await importOriginal<typeof import("next-auth")>()),
  getServerSession: async () => session.current,
}));

const { POST } = await import("@/app/api/thresholds/backtest/route");

let t: TempDb;
let db: Db;
let fleet: Fleet;
const users = new Map<string, number>();

beforeAll(() => {
  t = makeTempDb("airkeep-backtest-route-");
  db = t.db;
  (globalThis as unknown as { airkeepDb?: Db }).airkeepDb = db;
  fleet = seedFleet(db);
  const add = (name: string, role: Role, siteIds: number[] = []) => {
    const id = Number(
      db.$client
        .prepare("INSERT INTO users (email, name, password_hash, role, all_sites, created_at, updated_at) VALUES (?, ?, 'x', ?, ?, 0, 0)")
        .run(`${name}@airkeep.test`, name, role, siteIds.length ? 0 : 1).lastInsertRowid,
    );
    for (const s of siteIds) db.$client.prepare("INSERT INTO user_sites (user_id, site_id) VALUES (?, ?)").run(id, s);
    createSession(db, { id: `sid-${name}`, userId: id, ip: "" });
    users.set(name, id);
  };
  add("tech", "technician");
  add("viewer", "viewer");
  add("site-a", "engineer", [fleet.siteA]);
  const now = Date.now();
  createReadingStore(db).insert(
    Array.from({ length: 5000 }, (_, i) => ({ ...reading(fleet.c1, 0, { finalC: i % 600 < 30 ? 155 : 140 }), ts: now - 6_000_000 + i * 1000 })),
  );
});
afterAll(() => {
  delete (globalThis as unknown as { airkeepDb?: Db }).airkeepDb;
  t.cleanup();
});

const as = (name: string | null) => {
  session.current = name ? { uid: users.get(name)!, sid: `sid-${name}` } : null;
};

const body = (compressorId: number) => ({
  compressorId,
  span: "24h",
  scopeType: "model",
  scopeId: fleet.modelId,
  limits: modelLimits.map((l) => ({ ...l, enabled: true, ...(l.priority === "warning" ? { value: 150 } : {}) })),
});

function post(json: unknown): Promise<Response> {
  return POST(new Request("http://localhost/api/thresholds/backtest", { method: "POST", body: JSON.stringify(json), headers: { "content-type": "application/json" } }));
}

describe("POST /api/thresholds/backtest", () => {
  it("streams progress, then the result with both sets side by side", async () => {
    as("tech");
    const res = await post(body(fleet.c1));
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/ndjson/);
    const lines = (await res.text()).trim().split("\n").map((l) => JSON.parse(l) as BacktestMessage);
    expect(lines.at(-1)!.type).toBe("result");
    expect(lines.filter((l) => l.type === "progress").length).toBeGreaterThan(0);
    const result = (lines.at(-1) as Extract<BacktestMessage, { type: "result" }>).result;
    expect(result.sources).toEqual([expect.objectContaining({ kind: "raw", rows: 5000 })]);
    // Nine 30-second spells at 155 °C: none crosses 160; each but the first (the unit is first seen at it, so still
    // settling: suppressed by design) crosses 150 for longer than the 10 s on-delay.
    expect(result.old.raises.warning).toBe(0);
    expect(result.new.raises.warning).toBe(8);
  });

  it("refuses a viewer (no thresholds.view), a compressor of another site, and bad input", async () => {
    as("viewer");
    expect((await post(body(fleet.c1))).status).toBe(403);
    as(null);
    expect((await post(body(fleet.c1))).status).toBe(401);
    as("site-a");
    expect((await post(body(fleet.c2))).status).toBe(404);
    expect((await post({ ...body(fleet.c1), span: "90d" })).status).toBe(400);
    const wrongModel = await post({ ...body(fleet.c1), scopeId: 999 });
    const last = JSON.parse((await wrongModel.text()).trim().split("\n").at(-1)!) as BacktestMessage;
    expect(last).toEqual({ type: "error", status: 400, error: "Choose a compressor of this model for the backtest." });
  });
});
