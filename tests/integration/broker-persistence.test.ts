import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { FastMemoryPersistence, topicMatches } from "@/lib/broker/persistence";
import { openQueueFile } from "@/lib/broker/queue-file";

describe("broker session store", () => {
  it("passes the aedes persistence conformance suite", () => {
    const r = spawnSync(process.execPath, ["--import", "tsx", "--test", "tests/integration/broker-persistence.conformance.ts"], {
      cwd: process.cwd(),
      encoding: "utf8",
      timeout: 60_000,
    });
    const summary = r.stdout.split("\n").filter((l) => /^# (tests|pass|fail) /.test(l));
    expect(summary).toEqual([expect.stringMatching(/^# tests [1-9]\d+$/), expect.stringMatching(/^# pass \d+$/), "# fail 0"]);
    expect(r.status).toBe(0);
  });

  it("matches MQTT topic filters", () => {
    expect(topicMatches("airkeep/v1/#", "airkeep/v1/north/hp-1/telemetry")).toBe(true);
    expect(topicMatches("airkeep/v1/#", "airkeep/v1")).toBe(true);
    expect(topicMatches("airkeep/v1/+/+/+", "airkeep/v1/north/hp-1/telemetry")).toBe(true);
    expect(topicMatches("airkeep/v1/+/+/+", "airkeep/v1/north/hp-1")).toBe(false);
    expect(topicMatches("airkeep/v1/+/+/+", "airkeep/v1/north/hp-1/telemetry/x")).toBe(false);
    expect(topicMatches("airkeep/v1/north/#", "airkeep/v1/south/hp-1/telemetry")).toBe(false);
    expect(topicMatches("a/b", "a/b")).toBe(true);
    expect(topicMatches("a/+", "a/")).toBe(true);
  });

  it("keeps acknowledgement and delivery constant-time with a long queue", async () => {
    const p = new FastMemoryPersistence();
    await p.setup({ id: "b" });
    const client = { id: "airkeep-ingester" };
    const N = 100_000;
    for (let i = 1; i <= N; i++) {
      await p.outgoingEnqueue({ clientId: client.id }, { topic: "t", payload: Buffer.from("x"), qos: 1, brokerId: "b", brokerCounter: i });
    }
    const t0 = performance.now();
    // Deliver and acknowledge from the back of the queue: the stock store scans the whole queue for each.
    for (let i = N; i > N - 5_000; i--) {
      const id = (i % 65_535) + 1;
      await p.outgoingUpdate(client, { topic: "t", payload: Buffer.alloc(0), qos: 1, brokerId: "b", brokerCounter: i, messageId: id });
      expect((await p.outgoingClearMessageId(client, { messageId: id }))?.brokerCounter).toBe(i);
    }
    expect(performance.now() - t0).toBeLessThan(1_000);
    expect(p.queued(client.id)).toBe(N - 5_000);
  });

  it("asks before queueing, so a client's queue can be capped", async () => {
    const p = new FastMemoryPersistence({ shouldDrop: (_id, queued) => queued >= 3 });
    await p.setup({ id: "b" });
    for (let i = 1; i <= 5; i++) {
      await p.outgoingEnqueueCombi([{ clientId: "c" }], { topic: "t", payload: Buffer.from("x"), qos: 1, brokerId: "b", brokerCounter: i });
    }
    expect(p.queued("c")).toBe(3);
  });
});

describe("broker queue file", () => {
  it("reloads what was queued and not acknowledged, in order, and numbers new messages after it", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-queue-"));
    const file = path.join(dir, "broker-queue.db");
    try {
      const first = new FastMemoryPersistence({ queueFile: openQueueFile(file) });
      await first.setup({ id: "b" });
      const client = { id: "airkeep-ingester" };
      for (let i = 1; i <= 5; i++) {
        await first.outgoingEnqueue({ clientId: client.id }, { topic: `t/${i}`, payload: Buffer.from([i]), qos: 1, brokerId: "b", brokerCounter: i });
      }
      // Two delivered and acknowledged, one delivered and not.
      for (const [counter, messageId] of [[1, 101], [2, 102], [3, 103]] as const) {
        await first.outgoingUpdate(client, { topic: `t/${counter}`, payload: Buffer.alloc(0), qos: 1, brokerId: "b", brokerCounter: counter, messageId });
      }
      await first.outgoingClearMessageId(client, { messageId: 101 });
      await first.outgoingClearMessageId(client, { messageId: 102 });
      await first.destroy();

      const second = new FastMemoryPersistence({ queueFile: openQueueFile(file) });
      await second.setup({ id: "b" });
      expect(second.queued(client.id)).toBe(3);
      await second.outgoingEnqueue({ clientId: client.id }, { topic: "t/6", payload: Buffer.from([6]), qos: 1, brokerId: "b", brokerCounter: 1 });
      const packets = await second.outgoingStream(client).toArray();
      expect(packets.map((p: { topic: string }) => p.topic)).toEqual(["t/3", "t/4", "t/5", "t/6"]);
      expect(packets.map((p: { payload: Buffer }) => p.payload[0])).toEqual([3, 4, 5, 6]);
      await second.destroy();
      const third = new FastMemoryPersistence({ queueFile: openQueueFile(file) });
      expect(third.queued(client.id)).toBe(4);
      await third.destroy();
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
