import path from "node:path";
import { describe, expect, it } from "vitest";
import { checkTree, upwardImports } from "../layering";

const root = path.resolve(import.meta.dirname, "../..");

describe("layering: imports run app → components → lib → db → shared", () => {
  it("the tree has no upward import", () => {
    const found = checkTree(root).map((u) => `${u.file}: "${u.specifier}" (${u.reason})`);
    expect(found).toEqual([]);
  });

  it.each([
    ["components/x/panel.tsx", 'import { save } from "@/app/(app)/x/actions";', "components/ may not import app/"],
    ["components/x/panel.tsx", 'import type { Row } from "@/db/rows";', "components/ may not import db/"],
    ["lib/x/job.ts", 'import { csv } from "@/app/api/x/csv";', "lib/ may not import app/"],
    ["lib/x/job.ts", 'import { Table } from "../../components/table";', "lib/ may not import components/"],
    ["lib/ingester/x.ts", 'import { sim } from "@/simulator/devices";', "lib/ may not import simulator/"],
    ["db/x.ts", 'import { engine } from "@/lib/alarms/engine";', "db/ may not import lib/"],
    ["db/x.ts", 'export { thing } from "../components/thing";', "db/ may not import components/"],
    ["db/x.ts", 'const m = await import("../app/api/x/route");', "db/ may not import app/"],
    ["shared/x.ts", 'import { db } from "../db/client";', "shared/ may not import db/"],
    ["shared/x.ts", 'import { useState } from "react";', "shared/ may use only zod among packages"],
    ["shared/x.ts", 'import fs from "node:fs";', "shared/ may use only zod among packages"],
    ["simulator/x.ts", 'import { createAlarmEngine } from "../lib/alarms/engine";', "simulator/ may not import lib/"],
  ])("flags %s → %s", (file, source, reason) => {
    expect(upwardImports(file, source)).toEqual([expect.objectContaining({ reason })]);
  });

  it.each([
    ["app/(app)/x/page.tsx", 'import { X } from "@/components/x"; import { q } from "@/db/x";'],
    ["components/x/panel.tsx", 'import { save } from "@/lib/actions/x"; import { z } from "@/shared/x"; import React from "react";'],
    ["lib/cli/demo.ts", 'import { writeDevicesFile } from "@/simulator/devices";'],
    ["db/x.ts", 'import { y } from "./y"; import { s } from "@/shared/s"; import { eq } from "drizzle-orm";'],
    ["shared/x.ts", 'import { z } from "zod"; import { a } from "./a";'],
    ["simulator/x.ts", 'import { d } from "../db/readings"; import { t } from "../shared/telemetry";'],
  ])("allows %s → %s", (file, source) => {
    expect(upwardImports(file, source)).toEqual([]);
  });
});
