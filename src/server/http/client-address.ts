import { isIP } from "node:net";

/**
 * The socket's address, written by the HTTP server guard (method-guard.ts, installed from
 * src/instrumentation.ts) over any header of that name a client sent.
 */
export const PEER_HEADER = "x-triskel-peer";

/**
 * The client a request without working credentials is counted as (src/server/http/rate-limit.ts).
 *
 * A Next.js route handler never sees the socket, and the headers alone cannot be believed: `next
 * start` copies the socket's address into X-Forwarded-For only when the request brings none
 * (next/dist/server/base-server.js, `x-forwarded-for ??= socket.remoteAddress`) and appends
 * nothing, so a client reaching the app directly could write any address there. So the HTTP
 * server guard stamps each request with the socket's address (PEER_HEADER). Hence:
 *
 * - `TRUSTED_PROXY_HOPS=0` (the default, the app is reached directly): the socket's address.
 *   Without the stamp (the guard not installed, e.g. a handler called in a unit test) every such
 *   request is counted under one key, `direct`.
 * - `TRUSTED_PROXY_HOPS=N`: N reverse proxies, each appending the address it saw, stand in front
 *   of the app and nothing reaches it around them; the client is the N-th entry from the end of
 *   X-Forwarded-For (the entries before it are the client's own word). A request that brings
 *   fewer entries uses the first one.
 *
 * IPv6 clients are counted by their /64 network (one host usually holds a whole /64), IPv4-mapped
 * IPv6 addresses as IPv4; a value that is not an address is counted under `unparsed`.
 */
export function clientAddress(headers: Headers, trustedProxyHops: number): string {
  if (trustedProxyHops <= 0) {
    const peer = headers.get(PEER_HEADER)?.trim();
    return peer ? normalizeAddress(peer) : "direct";
  }
  const chain = (headers.get("x-forwarded-for") ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean);
  if (chain.length === 0) return "direct";
  const entry = chain.length >= trustedProxyHops ? chain[chain.length - trustedProxyHops] : chain[0];
  return normalizeAddress(entry);
}

/** `1.2.3.4`, `1.2.3.4:5678`, `::ffff:1.2.3.4` -> `1.2.3.4`; `[2001:db8::1]:443`, `2001:db8::1` -> `2001:db8:0:0::/64`. */
export function normalizeAddress(value: string): string {
  let v = value.trim();
  const bracketed = /^\[([^\]]+)\](?::\d+)?$/.exec(v);
  if (bracketed) v = bracketed[1];
  const v4WithPort = /^(\d{1,3}(?:\.\d{1,3}){3}):\d+$/.exec(v);
  if (v4WithPort) v = v4WithPort[1];
  v = v.replace(/%.*$/, ""); // zone index (fe80::1%eth0)
  const mapped = /^::ffff:(\d{1,3}(?:\.\d{1,3}){3})$/i.exec(v);
  if (mapped) v = mapped[1];
  const kind = isIP(v);
  if (kind === 4) return v;
  if (kind === 6) return `${ipv6Groups(v).slice(0, 4).join(":")}::/64`;
  return "unparsed";
}

/** The eight 16-bit groups of a valid IPv6 address, in lower-case hex without leading zeros. */
function ipv6Groups(v: string): string[] {
  let text = v.toLowerCase();
  const v4 = /(\d{1,3})\.(\d{1,3})\.(\d{1,3})\.(\d{1,3})$/.exec(text);
  if (v4) {
    const [a, b, c, d] = v4.slice(1).map(Number);
    text = text.slice(0, v4.index) + `${((a << 8) | b).toString(16)}:${((c << 8) | d).toString(16)}`;
  }
  const [head, tail] = text.includes("::") ? text.split("::") : [text, undefined];
  const left = head ? head.split(":") : [];
  const right = tail ? tail.split(":") : [];
  const fill = tail === undefined ? [] : Array(8 - left.length - right.length).fill("0");
  return [...left, ...fill, ...right].map((g) => parseInt(g, 16).toString(16));
}
