import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";

function preflight(root: string) {
  return spawnSync(process.execPath, ["tests/preflight.mjs"], { env: { ...process.env, PREFLIGHT_ROOT: root }, encoding: "utf8" });
}

describe("npm test preflight", () => {
  it("stops with one sentence naming what to install when chromium and mosquitto are missing", () => {
    const empty = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-preflight-"));
    const run = preflight(empty);
    expect(run.status).toBe(1);
    expect(run.stderr.trim().split("\n")).toHaveLength(1);
    expect(run.stderr).toContain("apt-get install -y chromium mosquitto");
    expect(run.stderr).toContain(".ci/run");
  });

  it("names only what is missing", () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-preflight-"));
    fs.mkdirSync(path.join(root, "usr/bin"), { recursive: true });
    fs.writeFileSync(path.join(root, "usr/bin/chromium"), "#!/bin/sh\n", { mode: 0o755 });
    const run = preflight(root);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain("install -y mosquitto");
    expect(run.stderr).not.toContain("chromium");
  });

  it("passes quietly on this machine, where both are installed", () => {
    const run = preflight("/");
    expect(run.stderr).toBe("");
    expect(run.status).toBe(0);
  });
});
