import { Random } from "./random";
import { DAY_MS, localTime, southernHemisphere, zoneOffsetMs } from "./local-time";

export type Climate = {
  annualMeanC: number;
  seasonalSwingC: number;
  dailySwingC: number;
};

export const temperateClimate: Climate = { annualMeanC: 11, seasonalSwingC: 8, dailySwingC: 4.5 };

/** Outdoor temperature: seasonal and daily cycles in local time plus a few slow weather waves, all fixed by the seed. */
export class Outdoor {
  private readonly waves: { periodMs: number; phase: number; amp: number }[];
  private readonly southern: boolean;

  constructor(
    private readonly timeZone: string,
    seed: string,
    private readonly climate: Climate = temperateClimate,
  ) {
    const r = new Random(`${seed}:weather`);
    this.waves = [2.3, 3.7, 6.1, 11.3].map((days, i) => ({
      periodMs: days * DAY_MS * r.uniform(0.9, 1.1),
      phase: r.uniform(0, 2 * Math.PI),
      amp: [1.6, 1.4, 1.2, 1.0][i]!,
    }));
    this.southern = southernHemisphere(timeZone);
  }

  private seasonDay = NaN;
  private seasonal = 0;

  private cachedMinute = NaN;
  private cachedC = 0;

  /** Outdoor temperature, °C; evaluated once per minute (it moves far less than the sensor noise in that time). */
  temperatureC(utcMs: number): number {
    const minute = Math.floor(utcMs / 60_000);
    if (minute !== this.cachedMinute) {
      this.cachedMinute = minute;
      this.cachedC = this.evaluate(minute * 60_000);
    }
    return this.cachedC;
  }

  private evaluate(utcMs: number): number {
    const local = utcMs + zoneOffsetMs(this.timeZone, utcMs);
    const day = Math.floor(local / DAY_MS);
    if (day !== this.seasonDay) {
      const lt = localTime(this.timeZone, utcMs);
      // coldest around 20 January (day 19) in the north, six months later in the south
      const phase = (2 * Math.PI * (lt.dayOfYear - 19)) / 365.25 + (this.southern ? Math.PI : 0);
      this.seasonal = -this.climate.seasonalSwingC * Math.cos(phase);
      this.seasonDay = day;
    }
    const hour = (local - day * DAY_MS) / 3_600_000;
    // warmest about 15:00, coolest about 03:00
    const daily = -this.climate.dailySwingC * Math.cos((2 * Math.PI * (hour - 3)) / 24);
    let weather = 0;
    for (const w of this.waves) weather += w.amp * Math.sin((2 * Math.PI * utcMs) / w.periodMs + w.phase);
    return this.climate.annualMeanC + this.seasonal + daily + weather;
  }
}
