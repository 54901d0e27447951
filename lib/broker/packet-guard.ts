import type net from "node:net";

// Reads MQTT frame headers as bytes arrive, before the packet parser buffers them, so a client cannot make the
// broker hold a large packet: the parser keeps a whole packet in memory until its last byte, and a fixed header may
// announce up to 256 MB.

export type GuardLimits = {
  /** Largest packet from a signed-in client. */
  maxPacketBytes: number;
  /** Largest CONNECT packet (credentials, client id and last will). */
  maxConnectBytes: number;
  /** Bytes a client may send before it is signed in (its CONNECT and anything sent behind it). */
  maxPreAuthBytes: number;
};

export type GuardRefusal = "not_connect_first" | "connect_too_large" | "packet_too_large" | "pre_auth_bytes" | "malformed_length";

const CONNECT = 1;

export class PacketGuard {
  authenticated = false;
  private state: "header" | "length" | "body" = "header";
  private packets = 0;
  private type = 0;
  private length = 0;
  private multiplier = 1;
  private lengthBytes = 0;
  private remaining = 0;
  private preAuthBytes = 0;

  constructor(private readonly limits: GuardLimits) {}

  /** Scans the next bytes of the stream; a refusal means the connection must be dropped unread. */
  check(buf: Buffer): GuardRefusal | null {
    if (!this.authenticated && (this.preAuthBytes += buf.length) > this.limits.maxPreAuthBytes) return "pre_auth_bytes";
    let i = 0;
    while (i < buf.length) {
      if (this.state === "body") {
        const n = Math.min(this.remaining, buf.length - i);
        this.remaining -= n;
        i += n;
        if (this.remaining === 0) this.state = "header";
        continue;
      }
      const b = buf[i++]!;
      if (this.state === "header") {
        this.type = b >> 4;
        if (this.packets++ === 0 && this.type !== CONNECT) return "not_connect_first";
        this.state = "length";
        this.length = 0;
        this.multiplier = 1;
        this.lengthBytes = 0;
        continue;
      }
      this.length += (b & 0x7f) * this.multiplier;
      this.multiplier *= 128;
      if (++this.lengthBytes > 4) return "malformed_length";
      if (b & 0x80) continue;
      if (this.type === CONNECT && this.length > this.limits.maxConnectBytes) return "connect_too_large";
      if (this.length > this.limits.maxPacketBytes) return "packet_too_large";
      this.remaining = this.length;
      this.state = this.remaining > 0 ? "body" : "header";
    }
    return null;
  }
}

/**
 * Puts a guard between the socket and aedes, which reads with `read()` on 'readable': bytes that break a limit
 * are never handed over, and the socket is destroyed.
 */
export function guardSocket(socket: net.Socket, limits: GuardLimits, onRefuse: (reason: GuardRefusal) => void): PacketGuard {
  const guard = new PacketGuard(limits);
  const read = socket.read.bind(socket);
  socket.read = (size?: number) => {
    const chunk: unknown = read(size);
    if (socket.destroyed) return null;
    if (!Buffer.isBuffer(chunk)) return chunk;
    const refusal = guard.check(chunk);
    if (!refusal) return chunk;
    onRefuse(refusal);
    socket.destroy();
    return null;
  };
  return guard;
}
