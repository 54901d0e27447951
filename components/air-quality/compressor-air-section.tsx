import Link from "next/link";
import type { AirTestDto, CartridgeDto } from "@/shared/air-quality-schema";
import { CartridgePanel } from "./cartridge-panel";
import { AirTestVerdict } from "./air-test-verdict";

/** The compressor page's air-quality part: cartridge use and the last air test. */
export function CompressorAirSection({ cartridge, lastTest, nextDueAt, timeZone }: { cartridge: CartridgeDto; lastTest: AirTestDto | null; nextDueAt: string; timeZone: string }) {
  return (
    <section aria-labelledby="air-h" className="space-y-3" data-testid="compressor-air">
      <h2 id="air-h" className="text-lg font-semibold">
        Air quality <Link href="/air-quality" className="text-sm font-normal underline">all records</Link>
      </h2>
      <CartridgePanel c={cartridge} timeZone={timeZone} />
      <p className="text-sm">
        Next air test due <span className="num">{nextDueAt}</span>
      </p>
      {lastTest ? <AirTestVerdict t={lastTest} timeZone={timeZone} /> : <p className="text-sm text-muted">No air test recorded.</p>}
    </section>
  );
}
