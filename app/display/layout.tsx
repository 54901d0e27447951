import type { Metadata } from "next";
import type { ReactNode } from "react";

export const metadata: Metadata = {
  title: "Wall display",
  robots: { index: false, follow: false },
  // The link token is in the address: never send it on as a referrer.
  referrer: "no-referrer",
};

/** Kiosk mode: no navigation, no sign-in; the page brings the board, its theme, units and the safety notice. */
export default function DisplayLayout({ children }: { children: ReactNode }) {
  return children;
}
