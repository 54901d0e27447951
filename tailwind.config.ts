import type { Config } from "tailwindcss";
import plugin from "tailwindcss/plugin";

/**
 * Airkeep's control-room palette. Greys carry everything normal; colour is reserved for abnormal states.
 * Each alarm priority is coded three ways — colour, shape and word — so it reads in greyscale and for colour-blind people:
 *   critical  red     octagon   "Critical"
 *   warning   amber   triangle  "Warning"
 *   advisory  violet  diamond   "Advisory"
 * Offline / stale data is never coloured: it is grey with a diagonal hatch and the word "Offline" or "Stale".
 * Two themes share these names: light (the default) and dark (`data-theme="dark"`, for control-room wall screens);
 * their values are in app/globals.css and `shared/palette.ts`, whose contrast is checked by a test.
 */
export const priorityShapes = {
  critical: "polygon(30% 0, 70% 0, 100% 30%, 100% 70%, 70% 100%, 30% 100%, 0 70%, 0 30%)",
  warning: "polygon(50% 0, 100% 100%, 0 100%)",
  advisory: "polygon(50% 0, 100% 50%, 50% 100%, 0 50%)",
} as const;

const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      // Values live in app/globals.css as CSS variables, one set per theme (light, and the dark control-room theme).
      colors: {
        canvas: "var(--ak-canvas)",
        panel: "var(--ak-panel)",
        raised: "var(--ak-raised)",
        line: "var(--ak-line)",
        ink: "var(--ak-ink)",
        muted: "var(--ak-muted)",
        faint: "var(--ak-faint)",
        normal: "var(--ak-normal)",
        critical: { DEFAULT: "var(--ak-critical)", soft: "var(--ak-critical-soft)", ink: "var(--ak-critical-ink)" },
        warning: { DEFAULT: "var(--ak-warning)", soft: "var(--ak-warning-soft)", ink: "var(--ak-warning-ink)" },
        advisory: { DEFAULT: "var(--ak-advisory)", soft: "var(--ak-advisory-soft)", ink: "var(--ak-advisory-ink)" },
      },
      fontFamily: {
        mono: ['"Roboto Mono"', "ui-monospace", "monospace"],
        sans: ["system-ui", '"Segoe UI"', "Roboto", '"Helvetica Neue"', "Arial", "sans-serif"],
      },
    },
  },
  plugins: [
    plugin(({ addUtilities }) => {
      addUtilities({
        ".shape-critical": { clipPath: priorityShapes.critical },
        ".shape-warning": { clipPath: priorityShapes.warning },
        ".shape-advisory": { clipPath: priorityShapes.advisory },
        ".hatch-stale": {
          backgroundImage:
            "repeating-linear-gradient(135deg, transparent 0 6px, var(--ak-hatch) 6px 8px)",
        },
      });
    }),
  ],
};

export default config;
