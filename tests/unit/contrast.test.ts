import { describe, expect, it } from "vitest";
import fs from "node:fs";
import path from "node:path";
import config, { staleHatchInk } from "@/tailwind.config";
import { sourceFiles } from "../layering";

// Text contrast of Airkeep's palette against WCAG 2.2 success criterion 1.4.3 (Contrast, Minimum, level AA):
// at least 4.5 : 1 for text. Relative luminance and contrast ratio as WCAG 2.2 defines them ("relative luminance":
// sRGB channels linearised, L = 0.2126 R + 0.7152 G + 0.0722 B; "contrast ratio": (L1 + 0.05) / (L2 + 0.05)).

type Rgb = [number, number, number];
const colors = config.theme!.extend!.colors as Record<string, string | Record<string, string>>;
const token = (name: string): Rgb => {
  const [base, shade = "DEFAULT"] = name.split("-");
  const v = colors[base!];
  return hex(typeof v === "string" ? v : v![shade]!);
};

function hex(h: string): Rgb {
  return [1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16)) as Rgb;
}

function relativeLuminance([r, g, b]: Rgb): number {
  const lin = (c: number) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
}

function contrastRatio(a: Rgb, b: Rgb): number {
  const [hi, lo] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x) as [number, number];
  return (hi + 0.05) / (lo + 0.05);
}

/** `over` painted with alpha on top of `under` (source-over compositing). */
function composite(under: Rgb, rgba: string): Rgb {
  const [r, g, b, a] = rgba.match(/[\d.]+/g)!.map(Number) as [number, number, number, number];
  return [r, g, b].map((c, i) => Math.round(c * a + under[i]! * (1 - a))) as Rgb;
}

const white: Rgb = [255, 255, 255];
const backgrounds: Record<string, Rgb> = {
  white,
  raised: token("raised"),
  panel: token("panel"),
  canvas: token("canvas"),
  // Stale tiles and notes are a panel under the hatch; text crosses its darker stripes.
  "panel under the stale hatch": composite(token("panel"), staleHatchInk),
};

describe("contrast formula", () => {
  it("matches the bounds of WCAG 2.2's definition: black on white is 21 : 1, a colour on itself 1 : 1", () => {
    expect(contrastRatio([0, 0, 0], white)).toBeCloseTo(21, 10);
    expect(contrastRatio(token("panel"), token("panel"))).toBe(1);
  });

  it("puts #767676 just above 4.5 : 1 on white and #777777 just below (from memory: the lightest AA grey on white)", () => {
    expect(contrastRatio(hex("#767676"), white)).toBeGreaterThanOrEqual(4.5);
    expect(contrastRatio(hex("#777777"), white)).toBeLessThan(4.5);
  });
});

describe("palette text contrast, WCAG 2.2 AA (4.5 : 1)", () => {
  const text = ["ink", "normal", "muted", "critical"];
  for (const t of text) {
    for (const [bg, rgb] of Object.entries(backgrounds)) {
      // Red text is an error message, never on a stale (hatched) surface.
      if (t === "critical" && bg.includes("hatch")) continue;
      it(`${t} text on ${bg}`, () => {
        expect(contrastRatio(token(t), rgb)).toBeGreaterThanOrEqual(4.5);
      });
    }
  }

  it.each([
    ["raised", "ink"],
    ["critical-ink", "critical"],
    ["warning-ink", "warning"],
    ["advisory-ink", "advisory"],
  ])("%s text on %s", (fg, bg) => {
    expect(contrastRatio(token(fg), token(bg))).toBeGreaterThanOrEqual(4.5);
  });

  it("faint (a line and fill colour) would fail as text, so no screen sets text in it", () => {
    expect(contrastRatio(token("faint"), backgrounds.canvas!)).toBeLessThan(4.5);
    const root = path.resolve(import.meta.dirname, "../..");
    const uses = sourceFiles(root).filter((f) => /\btext-faint\b/.test(fs.readFileSync(path.join(root, f), "utf8")));
    expect(uses).toEqual([]);
  });
});
