import type { Metadata } from "next";
import type { ReactNode } from "react";
import { Providers } from "@/components/providers";
import { SAFETY_NOTICE } from "@/shared/safety";
import { defaultUnits } from "@/shared/units";

export const metadata: Metadata = {
  title: "Wall display",
  robots: { index: false, follow: false },
  // The link token is in the address: never send it on as a referrer.
  referrer: "no-referrer",
};

/** Kiosk mode: no navigation, no sign-in; the board and the safety notice only. */
export default function DisplayLayout({ children }: { children: ReactNode }) {
  return (
    <Providers units={defaultUnits}>
      <div className="flex min-h-screen flex-col">
        <main className="flex-1 px-[1.2vw] py-[1vw]">{children}</main>
        <p
          role="note"
          aria-label="Safety notice"
          data-testid="safety-notice"
          className="sticky bottom-0 border-t border-line bg-panel px-[1.2vw] py-[0.4vw] text-muted"
          style={{ fontSize: "clamp(12px, 0.75vw, 36px)" }}
        >
          <strong className="text-ink">Safety: </strong>
          {SAFETY_NOTICE}
        </p>
      </div>
    </Providers>
  );
}
