import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import type { Db } from "@/db/client";
import { createSession } from "@/db/sessions";
import type { Role } from "@/shared/roles";
import { makeTempDb, seedFleet, type Fleet, type TempDb } from "./alarms-fixtures";

// Route handlers called as the browser calls them: a NUL in the event search, the health details, and the backtest's
// origin check and body limit.

const session = vi.hoisted(() => ({ current: null as { uid: number; sid: string } | null }));
vi.mock("next-auth", async (importOriginal) => ({
  ...(await importOriginal<typeof import("next-auth")>()),
  getServerSession: async () => session.current,
}));

const events = await import("@/app/api/events/route");
const csv = await import("@/app/api/events/export.csv/route");
const health = await import("@/app/api/health/route");
const backtest = await import("@/app/api/thresholds/backtest/route");

let t: TempDb;
let db: Db;
let fleet: Fleet;
const users = new Map<string, number>();

beforeAll(() => {
  t = makeTempDb("airkeep-web-routes-");
  db = t.db;
  (globalThis as unknown as { airkeepDb?: Db }).airkeepDb = db;
  fleet = seedFleet(db);
  for (const [name, role] of [["tech", "technician"], ["admin", "admin"]] as [string, Role][]) {
    const id = Number(
      db.$client
        .prepare("INSERT INTO users (email, name, password_hash, role, all_sites, created_at, updated_at) VALUES (?, ?, 'x', ?, 1, 0, 0)")
        .run(`${name}@airkeep.test`, name, role).lastInsertRowid,
    );
    createSession(db, { id: `sid-${name}`, userId: id, ip: "" });
    users.set(name, id);
  }
});
afterAll(() => {
  delete (globalThis as unknown as { airkeepDb?: Db }).airkeepDb;
  t.cleanup();
});

const as = (name: string | null) => {
  session.current = name ? { uid: users.get(name)!, sid: `sid-${name}` } : null;
};

describe("event search with a NUL byte", () => {
  it("answers 400 for the page data and for the CSV export, before any CSV is sent", async () => {
    as("tech");
    const page = await events.GET(new Request("http://localhost/api/events?q=a%00b"));
    expect(page.status).toBe(400);
    const file = await csv.GET(new Request("http://localhost/api/events/export.csv?q=a%00b"));
    expect(file.status).toBe(400);
    expect(file.headers.get("content-type")).toMatch(/json/);
    expect((await file.json()).fieldErrors.q).toBeDefined();
    // An ordinary search still works.
    expect((await events.GET(new Request("http://localhost/api/events?q=oil"))).status).toBe(200);
  });
});

describe("GET /api/health", () => {
  it("tells anyone the bare status and administrators the details", async () => {
    as(null);
    const bare = await (await health.GET()).json();
    expect(Object.keys(bare).sort()).toEqual(["database", "status"]);
    expect(Object.keys(bare.database)).toEqual(["ok"]);
    as("tech");
    expect(Object.keys(await (await health.GET()).json()).sort()).toEqual(["database", "status"]);
    as("admin");
    const full = await (await health.GET()).json();
    expect(full).toHaveProperty("version");
    expect(full).toHaveProperty("ingester");
    expect(full.database).toHaveProperty("migrations");
  });
});

describe("POST /api/thresholds/backtest", () => {
  const url = "http://localhost/api/thresholds/backtest";

  it("refuses another site's page", async () => {
    as("tech");
    const res = await backtest.POST(
      new Request(url, { method: "POST", body: "{}", headers: { origin: "https://evil.example", "content-type": "application/json" } }),
    );
    expect(res.status).toBe(403);
    const fetchSite = await backtest.POST(new Request(url, { method: "POST", body: "{}", headers: { "sec-fetch-site": "cross-site" } }));
    expect(fetchSite.status).toBe(403);
  });

  it("stops reading a chunked body at 64 KB and answers 413", async () => {
    as("tech");
    let sent = 0;
    const chunk = new Uint8Array(16 * 1024).fill(0x20);
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent >= 50 * 1024 * 1024) return controller.close();
        sent += chunk.byteLength;
        controller.enqueue(chunk);
      },
    });
    const res = await backtest.POST(new Request(url, { method: "POST", body, duplex: "half" } as RequestInit));
    expect(res.status).toBe(413);
    expect(sent).toBeLessThan(256 * 1024);
    expect(fleet.c1).toBeGreaterThan(0);
  });
});
