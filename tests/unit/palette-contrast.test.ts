import fs from "node:fs";
import { describe, expect, it } from "vitest";
import { palettes, type Theme } from "@/shared/palette";

// WCAG 2.1 relative luminance and contrast ratio (W3C, WCAG 2.1 "relative luminance" and "contrast ratio" definitions).
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
  return 0.2126 * r! + 0.7152 * g! + 0.0722 * b!;
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05);
}

describe("palette contrast", () => {
  it("computes the ratio as WCAG defines it", () => {
    // WCAG 2.1: black on white is the maximum, 21:1.
    expect(contrast("#000000", "#ffffff")).toBeCloseTo(21, 5);
    // From memory (WebAIM's contrast checker): #767676 on white is 4.54:1, the lightest grey that passes AA.
    expect(contrast("#767676", "#ffffff")).toBeCloseTo(4.54, 2);
  });

  it("dark theme: every text colour reaches AA (4.5:1) on every surface, and each priority's word on its colour", () => {
    const p = palettes.dark;
    for (const surface of [p.canvas, p.panel, p.raised]) {
      for (const text of [p.ink, p.muted, p.faint, p.normal]) expect(contrast(text, surface)).toBeGreaterThanOrEqual(4.5);
    }
    for (const k of ["critical", "warning", "advisory"] as const) {
      expect(contrast(p[`${k}-ink`], p[k])).toBeGreaterThanOrEqual(4.5);
      // The soft tint carries ink-coloured text.
      expect(contrast(p.ink, p[`${k}-soft`])).toBeGreaterThanOrEqual(4.5);
    }
  });

  it("light theme: ink and muted text reach AA on every surface, and each priority's word on its colour", () => {
    const p = palettes.light;
    for (const surface of [p.canvas, p.panel, p.raised]) {
      for (const text of [p.ink, p.muted, p.normal]) expect(contrast(text, surface)).toBeGreaterThanOrEqual(4.5);
    }
    for (const k of ["critical", "warning", "advisory"] as const) expect(contrast(p[`${k}-ink`], p[k])).toBeGreaterThanOrEqual(4.5);
  });

  it("app/globals.css declares exactly the values of shared/palette.ts for both themes", () => {
    const css = fs.readFileSync("app/globals.css", "utf8");
    const block = (selector: string) => css.slice(css.indexOf(`${selector} {`), css.indexOf("}", css.indexOf(`${selector} {`)));
    for (const [theme, selector] of [["light", ":root"], ["dark", '[data-theme="dark"]']] as [Theme, string][]) {
      const declared = Object.fromEntries([...block(selector).matchAll(/--ak-([a-z-]+):\s*([^;]+);/g)].map((m) => [m[1], m[2]!.trim()]));
      expect(declared).toEqual(palettes[theme]);
    }
  });
});
