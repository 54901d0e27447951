import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { palettes, themes } from "@/shared/palette";
import { sourceFiles } from "../layering";

// Text contrast against WCAG 2.2 success criterion 1.4.3 (Contrast, Minimum, level AA): at least 4.5 : 1, with
// relative luminance and contrast ratio as WCAG 2.2 defines them. Beside tests/unit/palette-contrast.test.ts (the
// surfaces of both themes), this checks the places text also sits: white fields, a panel under the stale hatch,
// red error text, and that no screen sets text in the faint grey.

type Rgb = [number, number, number];

function rgb(color: string): Rgb {
  if (color.startsWith("#")) return [1, 3, 5].map((i) => parseInt(color.slice(i, i + 2), 16)) as Rgb;
  return color.match(/[\d.]+/g)!.slice(0, 3).map(Number) as Rgb;
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

/** An rgba() colour painted over `under` (source-over compositing). */
function composite(under: Rgb, rgba: string): Rgb {
  const [r, g, b, a] = rgba.match(/[\d.]+/g)!.map(Number) as [number, number, number, number];
  return [r, g, b].map((c, i) => Math.round(c * a + under[i]! * (1 - a))) as Rgb;
}

describe("contrast formula", () => {
  it("matches WCAG 2.2's bounds: black on white is 21 : 1, a colour on itself 1 : 1", () => {
    expect(contrastRatio([0, 0, 0], [255, 255, 255])).toBeCloseTo(21, 10);
    expect(contrastRatio(rgb("#eceef0"), rgb("#eceef0"))).toBe(1);
  });

  it("puts #767676 just above 4.5 : 1 on white and #777777 just below (from memory: the lightest AA grey on white)", () => {
    expect(contrastRatio(rgb("#767676"), [255, 255, 255])).toBeGreaterThanOrEqual(4.5);
    expect(contrastRatio(rgb("#777777"), [255, 255, 255])).toBeLessThan(4.5);
  });
});

describe.each(themes)("%s theme: text at WCAG 2.2 AA (4.5 : 1)", (theme) => {
  const p = palettes[theme];
  const backgrounds: Record<string, Rgb> = {
    ...(theme === "light" ? { "white (form fields)": [255, 255, 255] as Rgb } : {}),
    raised: rgb(p.raised),
    panel: rgb(p.panel),
    canvas: rgb(p.canvas),
    // Stale tiles and notes are a panel under the hatch; text crosses its stripes.
    "panel under the stale hatch": composite(rgb(p.panel), p.hatch),
  };
  for (const text of ["ink", "normal", "muted"] as const) {
    it.each(Object.entries(backgrounds))(`${text} text on %s`, (_bg, bg) => {
      expect(contrastRatio(rgb(p[text]), bg)).toBeGreaterThanOrEqual(4.5);
    });
  }
  // Red text is an error message (e.g. the units picker's) in the light pages, never on a hatched surface.
  it.skipIf(theme === "dark").each(Object.entries(backgrounds).filter(([bg]) => !bg.includes("hatch")))("critical text on %s", (_bg, bg) => {
    expect(contrastRatio(rgb(p.critical), bg)).toBeGreaterThanOrEqual(4.5);
  });
});

describe("the faint grey", () => {
  it("would fail as text on the light canvas, so no screen sets text in it (it is for lines and fills)", () => {
    expect(contrastRatio(rgb(palettes.light.faint), rgb(palettes.light.canvas))).toBeLessThan(4.5);
    const root = path.resolve(import.meta.dirname, "../..");
    const uses = sourceFiles(root).filter((f) => /\btext-faint\b/.test(fs.readFileSync(path.join(root, f), "utf8")));
    expect(uses).toEqual([]);
  });
});
