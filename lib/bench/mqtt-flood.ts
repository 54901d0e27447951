import net from "node:net";

// A misbehaving MQTT client for the broker's limits (benchmark and tests): announces a packet and keeps sending.

/** An MQTT fixed header: packet type and a remaining length (MQTT 3.1.1 §2.2.3, up to 4 length bytes). */
export function fixedHeader(type: number, remainingLength: number): Buffer {
  const bytes = [type << 4];
  let n = remainingLength;
  do {
    let b = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) b |= 0x80;
    bytes.push(b);
  } while (n > 0);
  return Buffer.from(bytes);
}

/** Sends `head`, then `bytes` more in chunks; resolves with the bytes written once the broker closes the socket. */
export function flood(port: number, head: Buffer, bytes: number, chunkBytes = 64 * 1024): { done: Promise<number>; socket: net.Socket } {
  const socket = net.connect(port, "127.0.0.1");
  const done = new Promise<number>((resolve) => {
    const chunk = Buffer.alloc(chunkBytes, 0x41);
    let sent = 0;
    socket.on("error", () => {});
    socket.on("close", () => resolve(sent));
    socket.once("connect", () => {
      socket.write(head);
      const pump = () => {
        while (!socket.destroyed && sent < bytes) {
          sent += chunk.length;
          if (!socket.write(chunk)) return void socket.once("drain", pump);
        }
        if (sent >= bytes) socket.end();
      };
      pump();
    });
  });
  return { done, socket };
}
