import type { Config } from "tailwindcss";
import plugin from "tailwindcss/plugin";

/**
 * Airkeep's control-room palette. Greys carry everything normal; colour is reserved for abnormal states.
 * Each alarm priority is coded three ways — colour, shape and word — so it reads in greyscale and for colour-blind people:
 *   critical  red     octagon   "Critical"
 *   warning   amber   triangle  "Warning"
 *   advisory  violet  diamond   "Advisory"
 * Offline / stale data is never coloured: it is grey with a diagonal hatch and the word "Offline" or "Stale".
 */
export const priorityShapes = {
  critical: "polygon(30% 0, 70% 0, 100% 30%, 100% 70%, 70% 100%, 30% 100%, 0 70%, 0 30%)",
  warning: "polygon(50% 0, 100% 100%, 0 100%)",
  advisory: "polygon(50% 0, 100% 50%, 50% 100%, 0 50%)",
} as const;

/** The stale hatch's stripes; text on a hatched panel is checked against them (tests/unit/contrast.test.ts). */
export const staleHatchInk = "rgba(27,30,34,0.12)";

const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        canvas: "#d9dbde",
        panel: "#eceef0",
        raised: "#f7f8f9",
        line: "#b9bdc3",
        ink: "#1b1e22",
        muted: "#555b63",
        // Lines and fills only, never text: no grey lighter than `muted` reaches 4.5 : 1 on `canvas`.
        faint: "#7b828b",
        normal: "#3d434a",
        critical: { DEFAULT: "#bd161c", soft: "#f6d5d6", ink: "#ffffff" },
        warning: { DEFAULT: "#e3a008", soft: "#faebc4", ink: "#1b1e22" },
        advisory: { DEFAULT: "#6d4fc2", soft: "#e4dcf6", ink: "#ffffff" },
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
            `repeating-linear-gradient(135deg, transparent 0 6px, ${staleHatchInk} 6px 8px)`,
        },
      });
    }),
  ],
};

export default config;
