/** Airkeep's two palettes: grey for everything normal, colour only for abnormal states. app/globals.css holds the same values. */
export const palettes = {
  light: {
    canvas: "#d9dbde",
    panel: "#eceef0",
    raised: "#f7f8f9",
    line: "#b9bdc3",
    ink: "#1b1e22",
    muted: "#555b63",
    // Lines and fills only, never text: no grey lighter than `muted` reaches 4.5 : 1 on `canvas`.
    faint: "#7b828b",
    normal: "#3d434a",
    critical: "#bd161c",
    "critical-soft": "#f6d5d6",
    "critical-ink": "#ffffff",
    warning: "#e3a008",
    "warning-soft": "#faebc4",
    "warning-ink": "#1b1e22",
    advisory: "#6d4fc2",
    "advisory-soft": "#e4dcf6",
    "advisory-ink": "#ffffff",
    hatch: "rgba(27, 30, 34, 0.12)",
  },
  // Dark control-room theme: dim greys so a wall screen does not light the room, the same hues for abnormal states.
  dark: {
    canvas: "#121417",
    panel: "#1b1e22",
    raised: "#23272c",
    line: "#3f464e",
    ink: "#eceef0",
    muted: "#b4bac1",
    faint: "#9aa1a9",
    normal: "#c9ced3",
    critical: "#d42a30",
    "critical-soft": "#4d1d20",
    "critical-ink": "#ffffff",
    warning: "#f0b429",
    "warning-soft": "#4a3a12",
    "warning-ink": "#121417",
    advisory: "#9d86ea",
    "advisory-soft": "#2f2650",
    "advisory-ink": "#121417",
    hatch: "rgba(236, 238, 240, 0.10)",
  },
} as const;

export type Theme = keyof typeof palettes;
export const themes = Object.keys(palettes) as Theme[];
