/**
 * Delivery-pressure samples of the current run, for the fill rate: the least-squares slope over the last
 * minute, kept as running sums so each sample costs O(1) however fast the device reports.
 */
export class FillRateWindow {
  private t: number[] = [];
  private p: number[] = [];
  private head = 0;
  // Sums of x = (t - origin) in seconds and y = pressure, over the samples in the window.
  private origin = 0;
  private n = 0;
  private sx = 0;
  private sy = 0;
  private sxx = 0;
  private sxy = 0;
  private syy = 0;

  constructor(
    private readonly windowMs = 60_000,
    private readonly minPoints = 5,
    private readonly minSpanMs = 5_000,
    private readonly minSpacingMs = 200,
  ) {}

  private clear(): void {
    this.t = [];
    this.p = [];
    this.head = 0;
    this.n = this.sx = this.sy = this.sxx = this.sxy = this.syy = 0;
  }

  /** Re-bases the sums on the oldest sample, so they never grow large enough to lose precision. */
  private rebase(): void {
    this.t = this.t.slice(this.head);
    this.p = this.p.slice(this.head);
    this.head = 0;
    this.origin = this.t[0] ?? 0;
    this.n = this.sx = this.sy = this.sxx = this.sxy = this.syy = 0;
    for (let i = 0; i < this.t.length; i++) this.include(this.t[i]!, this.p[i]!, 1);
  }

  private include(ts: number, bar: number, sign: 1 | -1): void {
    const x = (ts - this.origin) / 1000;
    this.n += sign;
    this.sx += sign * x;
    this.sy += sign * bar;
    this.sxx += sign * x * x;
    this.sxy += sign * x * bar;
    this.syy += sign * bar * bar;
  }

  /** Adds a sample; a sample taken while not running ends the fill and clears the window. */
  add(ts: number, deliveryBar: number | null, running: boolean): void {
    if (!running || deliveryBar === null) {
      if (this.n > 0) this.clear();
      return;
    }
    const last = this.t[this.t.length - 1];
    // At most one sample per minSpacingMs: a minute's slope needs no more, and memory stays bounded per unit.
    if (last !== undefined && ts < last + this.minSpacingMs) return;
    if (this.n === 0) this.origin = ts;
    this.t.push(ts);
    this.p.push(deliveryBar);
    this.include(ts, deliveryBar, 1);
    const from = ts - this.windowMs;
    while (this.head < this.t.length && this.t[this.head]! < from) {
      this.include(this.t[this.head]!, this.p[this.head]!, -1);
      this.head++;
    }
    if (this.head > 1024 || ts - this.origin > 10 * this.windowMs) this.rebase();
  }

  /** Slope in bar per minute over the window, or null with too few or too closely spaced samples. */
  slopeBarPerMin(): number | null {
    const n = this.t.length - this.head;
    if (n < this.minPoints) return null;
    if (this.t[this.t.length - 1]! - this.t[this.head]! < this.minSpanMs) return null;
    const sxx = this.sxx - (this.sx * this.sx) / n;
    if (sxx <= 0) return null;
    const sxy = this.sxy - (this.sx * this.sy) / n;
    return (sxy / sxx) * 60;
  }

  /**
   * The slope only once it can be trusted for a projection: the window spans at least `minSpanMs` of one run and the
   * slope's standard error is at most `maxRelError` of it (a draw-off starting mid-window bends the line and fails this).
   */
  steadySlopeBarPerMin(minSpanMs: number, maxRelError: number): number | null {
    const n = this.t.length - this.head;
    if (n < Math.max(this.minPoints, 4)) return null;
    if (this.t[this.t.length - 1]! - this.t[this.head]! < minSpanMs) return null;
    const sxx = this.sxx - (this.sx * this.sx) / n;
    if (sxx <= 0) return null;
    const sxy = this.sxy - (this.sx * this.sy) / n;
    const syy = this.syy - (this.sy * this.sy) / n;
    const slope = sxy / sxx;
    const residual = Math.max(0, syy - slope * sxy) / (n - 2);
    const se = Math.sqrt(residual / sxx);
    if (!(slope > 0) || se > maxRelError * slope) return null;
    return slope * 60;
  }
}
