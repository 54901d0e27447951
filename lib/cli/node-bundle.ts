import path from "node:path";
import { build } from "esbuild";

/**
 * Bundles a server program (its own code; packages stay in node_modules) into one ES module run by plain Node.
 * Under tsx every process would carry the loader's thread and caches: about 30 MB more memory each.
 */
export async function bundleNodeProgram(entry: string, outfile: string): Promise<string> {
  const out = path.resolve(outfile);
  await build({
    entryPoints: [entry],
    outfile: out,
    bundle: true,
    platform: "node",
    format: "esm",
    target: "node20",
    packages: "external",
    sourcemap: true,
    tsconfig: "tsconfig.json",
    logLevel: "warning",
  });
  return out;
}

/**
 * Node flags per server program. The ingester's young generation is kept small: readings wait for their commit long
 * enough to be promoted anyway, and the default 16 MB semi-spaces only add to its memory (−30 MB peak, same CPU).
 */
export function programFlags(name: string): string[] {
  return ["--enable-source-maps", ...(name === "ingester" ? ["--max-semi-space-size=8", "--heap-growing-percent=100"] : [])];
}
