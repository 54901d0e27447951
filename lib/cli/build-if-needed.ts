import fs from "node:fs";
import path from "node:path";
import { runToEnd } from "./processes";

const SOURCES = ["app", "components", "lib", "shared", "db", "proxy.ts", "next.config.mjs", "tailwind.config.ts", "package.json"];

function newestMtime(p: string): number {
  const st = fs.statSync(p, { throwIfNoEntry: false });
  if (!st) return 0;
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = 0;
  for (const entry of fs.readdirSync(p)) newest = Math.max(newest, newestMtime(path.join(p, entry)));
  return newest;
}

/** Builds the web app when there is no build or a source file is newer than it. */
export async function buildIfNeeded(env: NodeJS.ProcessEnv): Promise<void> {
  const buildId = fs.statSync(".next/BUILD_ID", { throwIfNoEntry: false });
  const newest = Math.max(...SOURCES.map(newestMtime));
  if (buildId && buildId.mtimeMs >= newest) return;
  console.log("[airkeep] building the web app (next build)…");
  await runToEnd(process.execPath, [path.resolve("node_modules/next/dist/bin/next"), "build"], env);
}
