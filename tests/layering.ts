import fs from "node:fs";
import path from "node:path";
import ts from "typescript";

// The layering rule of DEVELOPERS.md as data: imports run app → components → lib → db → shared, never back up.
// The simulator is a program of its own beside them.

export const layers = ["app", "components", "lib", "db", "shared", "simulator"] as const;
export type Layer = (typeof layers)[number];

const mayImport: Record<Layer, readonly Layer[]> = {
  app: ["app", "components", "lib", "db", "shared"],
  components: ["components", "lib", "shared"],
  lib: ["lib", "db", "shared"],
  db: ["db", "shared"],
  shared: ["shared"],
  simulator: ["simulator", "db", "shared"],
};

/** Packages shared/ may use: it runs in the browser, the server and the simulator alike. */
const sharedPackages = new Set(["zod"]);

export type UpwardImport = { file: string; specifier: string; reason: string };

export function layerOf(file: string): Layer | null {
  const top = file.split(/[\\/]/)[0] as Layer;
  return layers.includes(top) ? top : null;
}

/** Repository-relative path an import points at, or null for a package. */
function target(file: string, specifier: string): string | null {
  if (specifier.startsWith("@/")) return path.posix.normalize(specifier.slice(2));
  if (specifier.startsWith(".")) return path.posix.normalize(path.posix.join(path.posix.dirname(file), specifier));
  return null;
}

function packageName(specifier: string): string {
  const parts = specifier.split("/");
  return specifier.startsWith("@") ? parts.slice(0, 2).join("/") : parts[0]!;
}

/** Every import (static, type-only, re-export, dynamic) of one source file that breaks the rule. */
export function upwardImports(file: string, source: string): UpwardImport[] {
  const from = layerOf(file);
  if (!from) return [];
  const found: UpwardImport[] = [];
  for (const { fileName: specifier } of ts.preProcessFile(source, true, true).importedFiles) {
    const to = target(file, specifier);
    if (to === null) {
      if (from === "shared" && !sharedPackages.has(packageName(specifier))) {
        found.push({ file, specifier, reason: "shared/ may use only zod among packages" });
      }
      continue;
    }
    const toLayer = layerOf(to);
    if (!toLayer || mayImport[from].includes(toLayer)) continue;
    // The demo launcher starts the simulator and writes its device list; benchmarks make their history with its model.
    if (toLayer === "simulator" && (file.startsWith("lib/cli/") || file.startsWith("lib/bench/"))) continue;
    found.push({ file, specifier, reason: `${from}/ may not import ${toLayer}/` });
  }
  return found;
}

/** Source files of every layer under the repository root, as repository-relative POSIX paths. */
export function sourceFiles(root: string): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(path.join(root, dir), { withFileTypes: true })) {
      const rel = path.posix.join(dir, e.name);
      if (e.isDirectory()) walk(rel);
      else if (/\.(ts|tsx|mts|cts)$/.test(e.name)) out.push(rel);
    }
  };
  for (const l of layers) if (fs.existsSync(path.join(root, l))) walk(l);
  return out.sort();
}

export function checkTree(root: string): UpwardImport[] {
  return sourceFiles(root).flatMap((f) => upwardImports(f, fs.readFileSync(path.join(root, f), "utf8")));
}
