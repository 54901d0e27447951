"use client";

import { useEffect, useRef, useState } from "react";
import { backoffDelayMs, LIVE_BACKOFF } from "@/shared/board";
import { liveMessageSchema, type LiveMessage } from "@/shared/live";
import { noteServerTime } from "./server-clock";

/**
 * connecting   — first connection being made
 * live         — socket open and the snapshot received
 * reconnecting — lost; trying again with backoff
 * signed-out   — the token handler says the session has ended (keeps retrying slowly)
 * refused      — the token handler refuses for good (revoked display link, no permission): no more attempts
 */
export type LiveStatus = "connecting" | "live" | "reconnecting" | "signed-out" | "refused";

export const liveStatusText: Record<LiveStatus, string> = {
  connecting: "Connecting…",
  live: "Live",
  reconnecting: "Reconnecting…",
  "signed-out": "Signed out — sign in again",
  refused: "Not allowed",
};

export type LiveState = {
  status: LiveStatus;
  /** HTTP status of the last refused token request (401, 403, 404, 410), if any. */
  refusal: number | null;
  /** Failed attempts since the last good connection. */
  attempts: number;
};

/** The hub pings every 20 s; silence for this long means the connection is dead even if the socket says open. */
const SILENCE_MS = 50_000;

type Ticket = { url: string; token: string };

/**
 * Keeps a live WebSocket open: fetches a short-lived token from `tokenUrl`, connects, hands every valid message to
 * `onMessage`, and reconnects by itself with exponential backoff and jitter (at once when the network comes back).
 * With `enabled` false the socket is closed and no attempt is made.
 */
export function useLive(tokenUrl: string, onMessage: (msg: LiveMessage) => void, enabled = true): LiveState {
  const [state, setState] = useState<LiveState>({ status: "connecting", refusal: null, attempts: 0 });
  const handler = useRef(onMessage);
  useEffect(() => {
    handler.current = onMessage;
  }, [onMessage]);

  useEffect(() => {
    if (!enabled) return;
    let stopped = false;
    let ws: WebSocket | null = null;
    let retry: ReturnType<typeof setTimeout> | null = null;
    let silence: ReturnType<typeof setTimeout> | null = null;
    let attempt = 0;
    let generation = 0;
    let abort: AbortController | null = null;

    const clearTimers = () => {
      if (retry) clearTimeout(retry);
      if (silence) clearTimeout(silence);
      retry = silence = null;
    };

    const schedule = (status: LiveStatus, refusal: number | null = null) => {
      if (stopped) return;
      clearTimers();
      // A session that has ended will not come back soon: wait the longest step.
      const delay = status === "signed-out" ? LIVE_BACKOFF.maxMs : backoffDelayMs(attempt);
      attempt++;
      setState({ status, refusal, attempts: attempt });
      retry = setTimeout(connect, delay);
    };

    const armSilence = () => {
      if (silence) clearTimeout(silence);
      silence = setTimeout(() => ws?.close(4000, "silent"), SILENCE_MS);
    };

    async function connect() {
      if (stopped) return;
      const mine = ++generation;
      const superseded = () => stopped || mine !== generation;
      retry = null;
      abort?.abort();
      abort = new AbortController();
      let ticket: Ticket;
      try {
        const res = await fetch(tokenUrl, {
          cache: "no-store",
          credentials: "same-origin",
          headers: { accept: "application/json" },
          signal: abort.signal,
        });
        if (superseded()) return;
        if (res.status === 401) return schedule("signed-out", 401);
        if (res.status === 403 || res.status === 404 || res.status === 410) {
          clearTimers();
          setState({ status: "refused", refusal: res.status, attempts: attempt });
          return;
        }
        if (!res.ok) return schedule("reconnecting");
        ticket = (await res.json()) as Ticket;
      } catch {
        if (!superseded()) schedule("reconnecting");
        return;
      }
      if (superseded()) return;
      let url: URL;
      try {
        url = new URL(ticket.url);
        url.searchParams.set("token", ticket.token);
      } catch {
        return schedule("reconnecting");
      }
      const socket = new WebSocket(url);
      ws = socket;
      armSilence();
      socket.onmessage = (ev) => {
        if (ws !== socket || typeof ev.data !== "string") return;
        let parsed: LiveMessage;
        try {
          const r = liveMessageSchema.safeParse(JSON.parse(ev.data));
          if (!r.success) return;
          parsed = r.data;
        } catch {
          return;
        }
        noteServerTime(parsed.at);
        armSilence();
        if (parsed.type === "snapshot") {
          attempt = 0;
          setState({ status: "live", refusal: null, attempts: 0 });
        }
        handler.current(parsed);
      };
      socket.onclose = (ev) => {
        if (ws !== socket) return;
        ws = null;
        if (ev.code === 4001 && !stopped) {
          // The hub ends every connection after its lifetime so revocations take effect: reconnect at once.
          clearTimers();
          attempt = 0;
          void connect();
          return;
        }
        schedule("reconnecting");
      };
      socket.onerror = () => {
        // a close event follows
      };
    }

    const reconnectNow = () => {
      if (stopped || ws) return;
      clearTimers();
      attempt = 0;
      void connect();
    };
    const onVisible = () => {
      if (document.visibilityState === "visible") reconnectNow();
    };
    window.addEventListener("online", reconnectNow);
    document.addEventListener("visibilitychange", onVisible);
    void connect();

    return () => {
      stopped = true;
      clearTimers();
      abort?.abort();
      window.removeEventListener("online", reconnectNow);
      document.removeEventListener("visibilitychange", onVisible);
      const s = ws;
      ws = null;
      s?.close(1000, "page closed");
    };
  }, [tokenUrl, enabled]);

  return state;
}
