import { DELIVERY_RULES, median } from "./shared/delivery-health";
import { freeAirLitres } from "./shared/air";
import { CompressorModel } from "./simulator/model/compressor";
const spec = { deviceId: "t-dive", stages: 3, ratedDeliveryLpm: 250, ratedPressureBar: 330, stopPressureBar: 300, restartPressureBar: 260, bankVolumeL: 200, profile: "dive" as const, timeZone: "Europe/Malta", oilPump: true };
const m = new CompressorModel(spec, { seed: "dh", startMs: Date.UTC(2025,5,2) });
let run: any[] = []; let prevRunning = false;
for (let i = 0; i < 7*86400/5; i++) {
  m.step(5); const r = m.reading(); const running = r.runState === "running";
  if (running) run.push({ ts: m.timeMs, bar: r.deliveryBar, c: r.intakeC });
  else if (prevRunning) {
    const f = run[0], l = run[run.length-1];
    const content = run.map(p => freeAirLitres(200, p.bar, p.c));
    // piece rates
    const rates: number[] = [];
    for (let a = 0; a < run.length; a += 24) { const b = Math.min(run.length, a + 24); if (b - a >= 4) rates.push((content[b-1]-content[a])/((run[b-1].ts-run[a].ts)/60000)); }
    console.log(new Date(f.ts).toISOString(), "from", f.bar, "to", l.bar, "min", ((l.ts-f.ts)/60000).toFixed(1), "rates", rates.map(x=>x.toFixed(0)).join(","), "true", m.deliveryLpm);
    run = [];
  }
  prevRunning = running;
}
