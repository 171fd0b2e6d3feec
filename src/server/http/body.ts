import "@/server/server-only";
import type { ApiError } from "./errors";

/**
 * The request body as bytes, reading no more than `limitBytes` whatever the Content-Length says
 * (a chunked body declares none): past the limit the read stops and `tooLarge(limitBytes)` is thrown.
 */
export async function readBodyCapped(req: Request, limitBytes: number, tooLarge: (limitBytes: number) => ApiError): Promise<Uint8Array<ArrayBuffer>> {
  if (!req.body) return new Uint8Array(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limitBytes) {
      await reader.cancel().catch(() => {});
      throw tooLarge(limitBytes);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}
