// The client address a failed request is counted under (src/server/http/client-address.ts): what a
// Next.js route handler can believe of X-Forwarded-For, given how many proxies the deployment trusts.
import { describe, expect, it } from "vitest";
import { clientAddress, normalizeAddress, PEER_HEADER } from "@/server/http/client-address";

const h = (xff?: string, extra: Record<string, string> = {}) => new Headers({ ...(xff === undefined ? {} : { "x-forwarded-for": xff }), ...extra });

describe("clientAddress", () => {
  it("with no trusted proxy (the default) believes only the socket's address the server stamped, never X-Forwarded-For", () => {
    expect(clientAddress(h(undefined, { [PEER_HEADER]: "::ffff:198.51.100.9" }), 0)).toBe("198.51.100.9");
    expect(clientAddress(h("203.0.113.5", { [PEER_HEADER]: "198.51.100.9" }), 0)).toBe("198.51.100.9"); // what the client wrote is ignored
    expect(clientAddress(h("198.51.100.7", { "x-real-ip": "198.51.100.8", [PEER_HEADER]: "2001:db8:1:2::5" }), 0)).toBe("2001:db8:1:2::/64");
    // Without the server's stamp (the guard not installed): no header is believed, one key for every client.
    expect(clientAddress(h(), 0)).toBe("direct");
    expect(clientAddress(h("127.0.0.1"), 0)).toBe("direct");
    expect(clientAddress(h("198.51.100.7", { "x-real-ip": "198.51.100.8" }), 0)).toBe("direct");
  });

  it("with N trusted proxies takes the N-th entry from the end, whatever the client wrote before it", () => {
    expect(clientAddress(h("203.0.113.5"), 1)).toBe("203.0.113.5");
    expect(clientAddress(h("10.9.9.9, 1.2.3.4, 203.0.113.5"), 1)).toBe("203.0.113.5");
    expect(clientAddress(h("10.9.9.9, 203.0.113.5, 192.0.2.1"), 2)).toBe("203.0.113.5");
    expect(clientAddress(h(" 203.0.113.5 ,192.0.2.1 "), 2)).toBe("203.0.113.5");
    // Fewer entries than proxies: the first one; none at all: the shared key.
    expect(clientAddress(h("203.0.113.5"), 3)).toBe("203.0.113.5");
    expect(clientAddress(h(), 1)).toBe("direct");
    expect(clientAddress(h(" , "), 1)).toBe("direct");
  });

  it("normalises addresses: ports, brackets, IPv4-mapped IPv6, IPv6 by /64, and anything else as one key", () => {
    expect(normalizeAddress("203.0.113.5:51234")).toBe("203.0.113.5");
    expect(normalizeAddress("::ffff:127.0.0.1")).toBe("127.0.0.1");
    expect(normalizeAddress("::FFFF:203.0.113.5")).toBe("203.0.113.5");
    expect(normalizeAddress("2001:db8:abcd:12:1:2:3:4")).toBe("2001:db8:abcd:12::/64");
    expect(normalizeAddress("2001:db8:abcd:12::99")).toBe("2001:db8:abcd:12::/64");
    expect(normalizeAddress("[2001:0db8:abcd:0012::1]:443")).toBe("2001:db8:abcd:12::/64");
    expect(normalizeAddress("::1")).toBe("0:0:0:0::/64");
    expect(normalizeAddress("2001:db8::")).toBe("2001:db8:0:0::/64");
    expect(normalizeAddress("fe80::1%eth0")).toBe("fe80:0:0:0::/64");
    expect(normalizeAddress("64:ff9b::203.0.113.5")).toBe("64:ff9b:0:0::/64");
    for (const junk of ["unknown", "", "999.1.1.1", "1.2.3", "<script>", "a".repeat(300)]) expect(normalizeAddress(junk), junk).toBe("unparsed");
  });
});
