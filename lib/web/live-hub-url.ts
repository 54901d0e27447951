import { requestHost, requestProto } from "./request-facts";

type HeaderSource = Parameters<typeof requestHost>[0];

/**
 * The live WebSocket hub's address as the browser must use it: LIVE_PUBLIC_URL when set (a reverse proxy in front
 * of the hub), otherwise the host name the page was loaded from with LIVE_PORT (default 3001).
 */
export function liveHubUrl(headers: HeaderSource): string {
  const explicit = process.env.LIVE_PUBLIC_URL;
  if (explicit) return explicit;
  const host = requestHost(headers) ?? "localhost";
  let hostname: string;
  try {
    hostname = new URL(`http://${host}`).hostname;
  } catch {
    hostname = "localhost";
  }
  const port = process.env.LIVE_PORT && /^\d+$/.test(process.env.LIVE_PORT) ? process.env.LIVE_PORT : "3001";
  const bracketed = hostname.includes(":") && !hostname.startsWith("[") ? `[${hostname}]` : hostname;
  return `${requestProto(headers) === "https" ? "wss" : "ws"}://${bracketed}:${port}/live`;
}
