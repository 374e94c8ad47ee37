import { createReadStream, createWriteStream } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { finished } from "node:stream/promises";

// A request body written to a temporary file as it arrives, before any database work starts: a client
// that stalls mid-upload then holds a file handle, never a transaction or a pooled connection.
export interface SpooledBody {
  bytes: number;
  /** True when the client stopped sending for longer than the idle limit (the body is then cut short). */
  stalled: boolean;
  open(): ReadableStream<Uint8Array>;
  remove(): Promise<void>;
}

export const SPOOL_IDLE_MS = 30_000;

/** Reads at most maxBytes + 1 bytes (so the caller can tell "too large"), giving up after idleMs without data. */
export async function spoolBody(body: ReadableStream<Uint8Array>, maxBytes: number, idleMs = SPOOL_IDLE_MS): Promise<SpooledBody> {
  const dir = await mkdtemp(path.join(tmpdir(), "halftrip-upload-"));
  const file = path.join(dir, "body");
  const out = createWriteStream(file);
  const reader = body.getReader();
  let bytes = 0;
  let stalled = false;
  try {
    for (;;) {
      let timer: NodeJS.Timeout | undefined;
      const idle = new Promise<"idle">((resolve) => (timer = setTimeout(() => resolve("idle"), idleMs)));
      const next = await Promise.race([reader.read(), idle]).finally(() => clearTimeout(timer));
      if (next === "idle") {
        stalled = true;
        await reader.cancel().catch(() => undefined);
        break;
      }
      if (next.done) break;
      const room = maxBytes + 1 - bytes;
      const chunk = next.value.byteLength > room ? next.value.subarray(0, room) : next.value;
      bytes += chunk.byteLength;
      if (!out.write(chunk)) await new Promise((resolve) => out.once("drain", resolve));
      if (bytes > maxBytes) {
        await reader.cancel().catch(() => undefined);
        break;
      }
    }
  } finally {
    out.end();
    await finished(out);
  }
  return {
    bytes,
    stalled,
    open: () => Readable.toWeb(createReadStream(file)) as ReadableStream<Uint8Array>,
    remove: () => rm(dir, { recursive: true, force: true }),
  };
}
