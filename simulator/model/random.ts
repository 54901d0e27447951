import seedrandom from "seedrandom";

// Normal quantiles at evenly spaced probabilities, by bisection on the CDF, built once.
const NOISE_TABLE: Float64Array = (() => {
  const n = 1024;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = normalQuantile((i + 0.5) / n);
  return out;
})();

function normalQuantile(p: number): number {
  let lo = -9;
  let hi = 9;
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (normalCdf(mid) < p) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

// Abramowitz & Stegun 7.1.26 for erf: |error| < 1.5e-7, ample for noise.
function normalCdf(x: number): number {
  const z = Math.abs(x) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * z);
  const erf = 1 - t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429)))) * Math.exp(-z * z);
  return x >= 0 ? (1 + erf) / 2 : (1 - erf) / 2;
}

/** A seeded generator with the few draws the model needs. */
export class Random {
  private readonly prng: seedrandom.PRNG;

  constructor(seed: string) {
    this.prng = seedrandom.alea(seed);
  }

  next(): number {
    return this.prng();
  }

  uniform(min: number, max: number): number {
    return min + (max - min) * this.prng();
  }

  int(min: number, maxInclusive: number): number {
    return min + Math.floor(this.prng() * (maxInclusive - min + 1));
  }

  chance(p: number): boolean {
    return this.prng() < p;
  }

  pick<T>(items: readonly T[]): T {
    return items[Math.floor(this.prng() * items.length)]!;
  }

  weighted<T>(items: readonly (readonly [T, number])[]): T {
    const total = items.reduce((s, [, w]) => s + w, 0);
    let r = this.prng() * total;
    for (const [item, w] of items) {
      r -= w;
      if (r < 0) return item;
    }
    return items[items.length - 1]![0];
  }

  /** Approximately standard normal, from a fixed table: cheap enough for sensor noise on every reading. */
  noise(): number {
    return NOISE_TABLE[(this.prng() * NOISE_TABLE.length) | 0]!;
  }

  /** Poisson draw by inversion; fine for the small means used here. */
  poisson(mean: number): number {
    const l = Math.exp(-mean);
    let k = 0;
    let p = this.prng();
    while (p > l) {
      k++;
      p *= this.prng();
    }
    return k;
  }
}
