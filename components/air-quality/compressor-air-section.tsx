import Link from "next/link";
import type { AirTestDto, CartridgeDto } from "@/shared/air-quality-schema";
import { CartridgePanel } from "./cartridge-panel";
import { AirTestVerdict } from "./air-test-verdict";
import { RatingForm, type ModelRating } from "./air-settings-admin";

/** The compressor page's air-quality part: cartridge use and the last air test. */
export function CompressorAirSection({
  cartridge,
  lastTest,
  nextDueAt,
  timeZone,
  override,
}: {
  cartridge: CartridgeDto;
  lastTest: AirTestDto | null;
  nextDueAt: string;
  timeZone: string;
  /** For administrators: this compressor's own cartridge rating, if any (scoped as modelId = compressor id). */
  override?: ModelRating;
}) {
  return (
    <section aria-labelledby="air-h" className="space-y-3" data-testid="compressor-air">
      <h2 id="air-h" className="text-lg font-semibold">
        Air quality <Link href="/air-quality" className="text-sm font-normal underline">all records</Link>
      </h2>
      <CartridgePanel c={cartridge} timeZone={timeZone} />
      {override && (
        <div className="rounded border border-line bg-raised p-3 text-sm">
          <p className="mb-1 text-muted">This compressor&apos;s own cartridge rating (leave the capacity empty to use the model&apos;s):</p>
          <RatingForm m={override} scopeType="compressor" />
        </div>
      )}
      <p className="text-sm">
        Next air test due <span className="num">{nextDueAt}</span>
      </p>
      {lastTest ? <AirTestVerdict t={lastTest} timeZone={timeZone} /> : <p className="text-sm text-muted">No air test recorded.</p>}
    </section>
  );
}
