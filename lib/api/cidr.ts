import ipaddr from "ipaddr.js";

/**
 * Client address ranges for API keys (CIDR, IPv4 and IPv6; ipaddr.js). An IPv4-mapped IPv6 address
 * (::ffff:203.0.113.7) counts as its IPv4 address. At most MAX_CIDRS ranges per key.
 */
export const MAX_CIDRS = 20;

type Range = [ipaddr.IPv4 | ipaddr.IPv6, number];

const normal = (a: ipaddr.IPv4 | ipaddr.IPv6) => (a.kind() === "ipv6" && (a as ipaddr.IPv6).isIPv4MappedAddress() ? (a as ipaddr.IPv6).toIPv4Address() : a);

/** Parses one range ("203.0.113.0/24", "2001:db8::/32", or a single address); null when malformed. */
export function parseCidr(text: string): Range | null {
  const s = text.trim();
  try {
    if (s.includes("/")) {
      const [addr, bits] = ipaddr.parseCIDR(s);
      return [normal(addr), addr.kind() === "ipv6" && (addr as ipaddr.IPv6).isIPv4MappedAddress() ? Math.max(0, bits - 96) : bits];
    }
    const a = normal(ipaddr.parse(s));
    return [a, a.kind() === "ipv4" ? 32 : 128];
  } catch {
    return null;
  }
}

/** The canonical spelling of a range (network address and prefix), e.g. "203.0.113.7/24" -> "203.0.113.0/24". */
export function canonicalCidr(text: string): string | null {
  const r = parseCidr(text);
  if (!r) return null;
  const [addr, bits] = r;
  const net = addr.kind() === "ipv4" ? ipaddr.IPv4.networkAddressFromCIDR(`${addr.toString()}/${bits}`) : ipaddr.IPv6.networkAddressFromCIDR(`${addr.toString()}/${bits}`);
  return `${net.toString()}/${bits}`;
}

/** True when `ip` lies in one of the ranges; an empty list allows every address, an unreadable address none. */
export function addressAllowed(ip: string | null, cidrs: readonly string[] | null | undefined): boolean {
  if (!cidrs || cidrs.length === 0) return true;
  if (!ip) return false;
  let a: ipaddr.IPv4 | ipaddr.IPv6;
  try {
    a = normal(ipaddr.parse(ip.trim()));
  } catch {
    return false;
  }
  for (const c of cidrs) {
    const r = parseCidr(c);
    if (r && r[0].kind() === a.kind() && a.match(r as [typeof a, number])) return true;
  }
  return false;
}

/**
 * The calling client's address as the edge reports it: the entry SUMFOLD_PROXY_HOPS (default 1) from the
 * right of X-Forwarded-For, i.e. the address the nearest trusted proxy saw. Next.js fills the header with the
 * socket's address when a request arrives without one. Key address ranges are only as trustworthy as this
 * header: expose the server through a proxy that appends or overwrites it (see DEVELOPERS.md).
 */
export function clientAddress(headers: Headers): string | null {
  const parts = (headers.get("x-forwarded-for") ?? "").split(",").map((p) => p.trim()).filter(Boolean);
  const hops = Math.max(1, Number(process.env.SUMFOLD_PROXY_HOPS) || 1);
  return parts.length >= hops ? parts[parts.length - hops] : (parts[0] ?? null);
}
