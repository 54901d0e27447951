"use client";

import { useLayoutEffect, useState, type RefObject } from "react";

const MIN_PX = 8;

/**
 * The largest font size (px) at which everything inside `ref` fits its box without scrolling: a wall screen shows
 * every compressor at once, as large as the screen allows. `key` changes when what is shown changes (e.g. the
 * number of tiles). Null while not fitting.
 */
export function useFitFont(ref: RefObject<HTMLElement | null>, enabled: boolean, key: string, itemSelector?: string): number | null {
  const [size, setSize] = useState<number | null>(null);
  useLayoutEffect(() => {
    const el = ref.current;
    if (!enabled || !el) {
      setSize(null);
      return;
    }
    const fit = () => {
      // Never larger than a fiftieth of the screen width: 7 tiles on a 4K screen stay tiles, not posters.
      let lo = MIN_PX;
      let hi = Math.max(MIN_PX, Math.floor(window.innerWidth / 50));
      const fits = (px: number) => {
        el.style.fontSize = `${px}px`;
        if (el.scrollHeight > el.clientHeight + 1 || el.scrollWidth > el.clientWidth + 1) return false;
        // Each item's own content must fit it too (a narrow column can squeeze a tile below its text).
        for (const item of itemSelector ? el.querySelectorAll<HTMLElement>(itemSelector) : []) {
          if (item.scrollWidth > item.clientWidth + 1 || item.scrollHeight > item.clientHeight + 1) return false;
        }
        return true;
      };
      if (fits(hi)) lo = hi;
      else {
        while (hi - lo > 0.25) {
          const mid = (lo + hi) / 2;
          if (fits(mid)) lo = mid;
          else hi = mid;
        }
      }
      el.style.fontSize = `${lo}px`;
      setSize(lo);
    };
    fit();
    const observer = new ResizeObserver(() => fit());
    observer.observe(document.documentElement);
    return () => observer.disconnect();
  }, [ref, enabled, key, itemSelector]);
  return size;
}
