import { describe, expect, it } from "vitest";
import { applyLiveToBoard, applyLiveToDetail, isNewerLive, liveEntries, mergeBoardData } from "@/components/board/live-merge";
import type { BoardCompressor, BoardData, CompressorDetail } from "@/shared/board";
import type { LiveCompressor } from "@/shared/live";

const live = (id: number, receivedAt: number | null, over: Partial<LiveCompressor> = {}): LiveCompressor => ({
  compressorId: id,
  online: true,
  receivedAt,
  ts: receivedAt,
  runState: "running",
  motorOn: true,
  deliveryBar: 300,
  stageBar: [],
  stageC: [120, 140, 150],
  oilBar: 4,
  purifierC: 20,
  intakeC: 15,
  hourMeterH: 1000,
  starts: 500,
  tripCode: null,
  fillRateBarPerMin: 5,
  ...over,
});

const tile = (id: number, l: LiveCompressor | null, liveStamp: number): BoardCompressor => ({
  id,
  name: `C${id}`,
  siteId: 1,
  modelName: "M",
  service: null,
  stages: 3,
  ratedPressureBar: 330,
  stopPressureBar: 300,
  restartPressureBar: 260,
  inService: true,
  live: l,
  liveStamp,
});

const board = (at: number, ...compressors: BoardCompressor[]): BoardData => ({
  at,
  sites: [{ id: 1, name: "Site", code: "site", timeZone: "UTC" }],
  compressors,
});

describe("isNewerLive", () => {
  it("prefers the later reading, then the later stamp", () => {
    expect(isNewerLive({ live: live(1, 100), liveStamp: 500 }, { live: live(1, 200), liveStamp: 150 })).toBe(true);
    expect(isNewerLive({ live: live(1, 200), liveStamp: 150 }, { live: live(1, 100), liveStamp: 500 })).toBe(false);
    // Same reading, then the device went offline: the later stamp carries the comms state.
    expect(isNewerLive({ live: live(1, 100), liveStamp: 150 }, { live: live(1, 100, { online: false }), liveStamp: 160 })).toBe(true);
    expect(isNewerLive({ live: live(1, 100), liveStamp: 150 }, { live: live(1, 100), liveStamp: 150 })).toBe(false);
    expect(isNewerLive({ live: null, liveStamp: 0 }, { live: live(1, null), liveStamp: 1 })).toBe(true);
    expect(isNewerLive({ live: live(1, 100), liveStamp: 1 }, { live: null, liveStamp: 9 })).toBe(false);
  });
});

describe("applying socket messages", () => {
  it("updates the named compressor and keeps the others as they were", () => {
    const a = tile(1, live(1, 100), 110);
    const b = tile(2, live(2, 100), 110);
    const data = board(110, a, b);
    const msg = { type: "update" as const, at: 220, compressor: live(1, 210, { deliveryBar: 305 }) };
    const r = applyLiveToBoard(data, liveEntries(msg));
    expect(r.unknown).toEqual([]);
    expect(r.data.compressors[0]!.live!.deliveryBar).toBe(305);
    expect(r.data.compressors[0]!.liveStamp).toBe(220);
    expect(r.data.compressors[1]).toBe(b);
  });

  it("ignores an update older than what is shown and reports compressors the board lacks", () => {
    const data = board(300, tile(1, live(1, 250), 260));
    const r = applyLiveToBoard(data, liveEntries({ type: "snapshot", at: 240, compressors: [live(1, 200), live(9, 230)] }));
    expect(r.data).toBe(data);
    expect(r.unknown).toEqual([9]);
  });

  it("a ping carries no values", () => {
    expect(liveEntries({ type: "ping", at: 1 })).toEqual([]);
  });

  it("updates a compressor page's detail only for its own compressor", () => {
    const detail = { at: 1, compressor: { id: 1 }, live: live(1, 100), liveStamp: 100 } as unknown as CompressorDetail;
    expect(applyLiveToDetail(detail, { live: live(2, 300), liveStamp: 300 })).toBe(detail);
    expect(applyLiveToDetail(detail, { live: live(1, 300), liveStamp: 300 }).live!.receivedAt).toBe(300);
  });
});

describe("mergeBoardData (a refetch meeting socket values)", () => {
  it("keeps the socket's newer value when the stored row lags behind", () => {
    const cached = board(1_000, tile(1, live(1, 990, { deliveryBar: 310 }), 995));
    const fetched = board(1_200, tile(1, live(1, 900, { deliveryBar: 290 }), 950));
    const merged = mergeBoardData(cached, fetched);
    expect(merged.compressors[0]!.live!.deliveryBar).toBe(310);
    expect(merged.at).toBe(1_200);
  });

  it("takes the stored value when it is newer (the socket was down), and new configuration always", () => {
    const cached = board(1_000, tile(1, live(1, 990), 995));
    const fetchedTile = { ...tile(1, live(1, 1_500, { online: false }), 1_600), stopPressureBar: 310 };
    const merged = mergeBoardData(cached, board(1_700, fetchedTile));
    expect(merged.compressors[0]).toBe(fetchedTile);
    const configOnly = { ...tile(1, live(1, 900), 900), name: "Renamed" };
    const merged2 = mergeBoardData(cached, board(1_700, configOnly));
    expect(merged2.compressors[0]!.name).toBe("Renamed");
    expect(merged2.compressors[0]!.live!.receivedAt).toBe(990);
  });

  it("returns the cached objects when nothing changed, so tiles do not re-render", () => {
    const t = tile(1, live(1, 990), 995);
    const cached = board(1_000, t);
    const same = mergeBoardData(cached, board(1_000, tile(1, live(1, 990), 995)));
    expect(same).toBe(cached);
    const later = mergeBoardData(cached, board(1_100, tile(1, live(1, 990), 995)));
    expect(later.compressors[0]).toBe(t);
  });

  it("adds and drops compressors with the configuration", () => {
    const cached = board(1_000, tile(1, live(1, 990), 995), tile(2, null, 0));
    const merged = mergeBoardData(cached, board(1_100, tile(3, null, 0)));
    expect(merged.compressors.map((c) => c.id)).toEqual([3]);
  });
});

describe("service badge", () => {
  it("a new service status on a fetch replaces the tile even when the live value is older", () => {
    const old: BoardData = { at: 1, sites: [], compressors: [tile(1, null, 5)] };
    const next: BoardData = { at: 2, sites: [], compressors: [{ ...tile(1, null, 4), service: { status: "overdue", overdue: 1, due: 0 } }] };
    expect(mergeBoardData(old, next).compressors[0]!.service).toEqual({ status: "overdue", overdue: 1, due: 0 });
  });
});
