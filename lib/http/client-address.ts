// The client's address, for sign-in throttling and the audit trail. X-Forwarded-For is written by
// whoever sends the request, so it is believed only as far as it was appended by proxies the
// shop configured (TRUSTED_PROXIES: IPs and CIDRs, comma-separated). Walking the list from the
// right, each trusted hop vouches for the one before it; the first untrusted address is the
// client (MDN, "X-Forwarded-For: Selecting an IP address"). With no trusted proxies, the address
// is the TCP peer's: scripts/serve.ts passes it to Next.js in PEER_HEADER, after removing any
// copy the request brought.
import { BlockList, isIP } from "node:net";

export const PEER_HEADER = "x-hearth-peer";

/** "::ffff:10.0.0.1" is the IPv4 client 10.0.0.1; "[::1]:80" and "10.0.0.1:80" lose the port. */
export function normalizeAddress(raw: string): string {
  let a = raw.trim();
  const bracketed = /^\[([^\]]+)\](?::\d+)?$/.exec(a);
  if (bracketed) a = bracketed[1];
  else if (/^\d+\.\d+\.\d+\.\d+:\d+$/.test(a)) a = a.slice(0, a.lastIndexOf(":"));
  return a.replace(/^::ffff:(\d+\.\d+\.\d+\.\d+)$/i, "$1").toLowerCase();
}

export type TrustedProxies = { has(address: string): boolean; size: number };

/** Parses "10.0.0.0/8, 192.168.1.5, ::1"; an entry that is neither an address nor a CIDR throws. */
export function parseTrustedProxies(list: string | undefined): TrustedProxies {
  const blocks = new BlockList();
  let size = 0;
  for (const entry of (list ?? "").split(",").map((s) => s.trim()).filter(Boolean)) {
    const [addr, bits] = entry.split("/");
    const family = isIP(addr);
    if (!family) throw new Error(`TRUSTED_PROXIES: "${entry}" is not an IP address or CIDR`);
    const type = family === 4 ? "ipv4" : "ipv6";
    if (bits === undefined) blocks.addAddress(addr, type);
    else {
      const prefix = Number(bits);
      if (!Number.isInteger(prefix) || prefix < 0 || prefix > (family === 4 ? 32 : 128)) throw new Error(`TRUSTED_PROXIES: "${entry}" has a bad prefix length`);
      blocks.addSubnet(addr, prefix, type);
    }
    size++;
  }
  return {
    size,
    has(address: string) {
      const a = normalizeAddress(address);
      const family = isIP(a);
      return family !== 0 && blocks.check(a, family === 4 ? "ipv4" : "ipv6");
    },
  };
}

/** The client's address given the socket peer, the X-Forwarded-For header and the trusted proxies. */
export function clientAddress(peer: string | null | undefined, forwardedFor: string | null | undefined, trusted: TrustedProxies): string {
  const hops = [...(forwardedFor ?? "").split(","), peer ?? ""].map(normalizeAddress).filter(Boolean);
  if (hops.length === 0) return "unknown";
  let i = hops.length - 1;
  // hops[i] is the address that handed us the request; while it is a trusted proxy, believe
  // the address it says it received the request from.
  while (i > 0 && trusted.has(hops[i])) i--;
  return hops[i].slice(0, 64);
}
