import { describe, expect, it } from "vitest";
import { clientAddress, normalizeAddress, parseTrustedProxies } from "@/lib/http/client-address";

// Right-to-left selection as MDN "X-Forwarded-For" describes it: the first address not added by
// a trusted proxy is the client.
describe("client address", () => {
  const none = parseTrustedProxies("");
  const lb = parseTrustedProxies("10.0.0.0/8, 192.168.1.5, ::1");

  it("ignores X-Forwarded-For when no proxy is trusted: the socket peer is the client", () => {
    expect(clientAddress("198.51.100.9", "203.0.113.7", none)).toBe("198.51.100.9");
    expect(clientAddress("::ffff:198.51.100.9", "1.2.3.4, 5.6.7.8", none)).toBe("198.51.100.9");
  });

  it("believes hops appended by trusted proxies only", () => {
    expect(clientAddress("10.1.2.3", "203.0.113.7", lb)).toBe("203.0.113.7");
    // a client forging its own header: the trusted proxy appended the real address last
    expect(clientAddress("10.1.2.3", "1.1.1.1, 203.0.113.7", lb)).toBe("203.0.113.7");
    expect(clientAddress("10.1.2.3", "1.1.1.1, 203.0.113.7, 192.168.1.5", lb)).toBe("203.0.113.7");
    // a peer that is not a trusted proxy is the client whatever it claims
    expect(clientAddress("198.51.100.9", "10.0.0.1", lb)).toBe("198.51.100.9");
    expect(clientAddress("::1", "", lb)).toBe("::1");
    expect(clientAddress(null, null, none)).toBe("unknown");
  });

  it("normalizes mapped IPv4, brackets and ports; refuses a bad list entry", () => {
    expect(normalizeAddress("::FFFF:127.0.0.1")).toBe("127.0.0.1");
    expect(normalizeAddress("[2001:db8::1]:443")).toBe("2001:db8::1");
    expect(normalizeAddress("203.0.113.7:5000")).toBe("203.0.113.7");
    expect(() => parseTrustedProxies("10.0.0.0/40")).toThrow(/prefix/);
    expect(() => parseTrustedProxies("proxy.local")).toThrow(/not an IP/);
    expect(parseTrustedProxies("127.0.0.1").has("::ffff:127.0.0.1")).toBe(true);
  });
});
