import { HttpError } from "../http/errors";

/**
 * Reads a request body while counting bytes, so an oversized body is refused as it arrives, with or
 * without a Content-Length.
 */
export async function readBodyWithLimit(req: Request, maxBytes: number): Promise<string> {
  const tooLarge = () => new HttpError(413, "too_large", `The body is over ${maxBytes / 1024} KiB; send fewer readings a request.`);
  const declared = Number(req.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > maxBytes) throw tooLarge();
  if (!req.body) return "";
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks, total).toString("utf8");
}
