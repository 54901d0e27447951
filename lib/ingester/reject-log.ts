/** Logs the first occurrence of each kind at once and then one summary line per window, however many follow. */
export function createRateLimitedLog(log: (line: string) => void, windowMs = 10_000) {
  const windows = new Map<string, { start: number; suppressed: number; lastDetail: string }>();
  const summarize = (key: string, w: { suppressed: number; lastDetail: string }) => {
    if (w.suppressed > 0) log(`${key}: ${w.suppressed} more in the last ${windowMs / 1000} s (last: ${w.lastDetail})`);
  };
  return {
    note(key: string, detail: string, now = Date.now()): void {
      const w = windows.get(key);
      if (w && now - w.start < windowMs) {
        w.suppressed++;
        w.lastDetail = detail;
        return;
      }
      if (w) summarize(key, w);
      windows.set(key, { start: now, suppressed: 0, lastDetail: detail });
      log(`${key}: ${detail}`);
    },
    flush(): void {
      for (const [key, w] of windows) summarize(key, w);
      windows.clear();
    },
  };
}
