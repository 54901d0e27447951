import type { IncomingMessage, ServerResponse } from "node:http";

// Next.js reads a server action's body up to experimental.serverActions.bodySizeLimit and then fails with a 500.
// Pages take no other POST, so a POST to a page is refused here by its declared length: 413 when too large, 411 when
// it declares none (browsers always send Content-Length for an action's form data).

/** Answers and returns true when the request is a page POST whose body is too large or of unknown length. */
export function refuseOversizedAction(req: IncomingMessage, res: ServerResponse, limitBytes: number): boolean {
  if (req.method !== "POST" || (req.url ?? "/").startsWith("/api/")) return false;
  const declared = req.headers["content-length"];
  const status = declared === undefined ? 411 : Number(declared) > limitBytes ? 413 : 0;
  if (!status) return false;
  const text = status === 413 ? `The request is larger than ${Math.round(limitBytes / 1024)} KB.` : "The request must state its length.";
  res.writeHead(status, { "content-type": "text/plain; charset=utf-8", connection: "close", "cache-control": "no-store" });
  res.end(text);
  req.resume();
  return true;
}
