import { BlockList, isIP } from "node:net";
import { env } from "./env.server";

// Who is asking: the client address used to key auth rate limits and recorded on sessions.
//
// scripts/serve.mjs puts the socket's peer address in the load context. A forwarded-for header
// (CLIENT_IP_HEADER) is believed only when that peer is one of TRUSTED_PROXIES, and then read from the
// right, skipping the proxies, to the first address no proxy of ours wrote. Anyone else's header is
// ignored: otherwise a client could pick a fresh address for every guess.

declare module "react-router" {
  interface AppLoadContext {
    /** The TCP peer of the request (scripts/lib/http-server.mjs); absent under the dev server and in tests. */
    peerAddress?: string | null;
  }
}

/** The header that carries the resolved client address from our routes into better-auth. */
export const CLIENT_ADDRESS_HEADER = "x-rakeline-client-address";

/** "::ffff:192.0.2.1" (IPv4 on an IPv6 socket) → "192.0.2.1"; anything not an IP address → null. */
export function normaliseAddress(value: string | null | undefined): string | null {
  if (!value) return null;
  let address = value.trim();
  if (address.startsWith("[") && address.endsWith("]")) address = address.slice(1, -1);
  const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(address);
  if (mapped) address = mapped[1];
  return isIP(address) ? address.toLowerCase() : null;
}

/** A list of addresses and CIDR ranges ("127.0.0.1, 10.0.0.0/8, ::1"); a malformed entry is an error. */
export function parseTrustedProxies(list: string): BlockList {
  const blocks = new BlockList();
  for (const raw of list.split(",").map((s) => s.trim()).filter(Boolean)) {
    const [address, prefix] = raw.split("/");
    const normalised = normaliseAddress(address);
    const family = normalised && isIP(normalised) === 6 ? "ipv6" : "ipv4";
    const bits = prefix === undefined ? (family === "ipv6" ? 128 : 32) : Number(prefix);
    if (!normalised || !Number.isInteger(bits) || bits < 0 || bits > (family === "ipv6" ? 128 : 32) || (prefix !== undefined && !/^\d+$/.test(prefix))) {
      throw new Error(`TRUSTED_PROXIES: "${raw}" is not an IP address or CIDR range`);
    }
    blocks.addSubnet(normalised, bits, family);
  }
  return blocks;
}

function isTrusted(address: string, trusted: BlockList): boolean {
  return trusted.check(address, isIP(address) === 6 ? "ipv6" : "ipv4");
}

/**
 * The client's address from the socket peer and the forwarded header's value. Only a trusted peer's header
 * counts; a malformed entry in it stops the walk at the last address we can vouch for.
 */
export function resolveClientAddress(peer: string | null | undefined, forwarded: string | null, trusted: BlockList): string | null {
  const peerAddress = normaliseAddress(peer);
  if (!peerAddress) return null;
  if (!forwarded || !isTrusted(peerAddress, trusted)) return peerAddress;
  let client = peerAddress;
  const hops = forwarded.split(",").map((s) => s.trim()).filter(Boolean);
  for (let i = hops.length - 1; i >= 0; i--) {
    const hop = normaliseAddress(hops[i]);
    if (!hop) break;
    client = hop;
    if (!isTrusted(hop, trusted)) break;
  }
  return client;
}

let trustedFromEnv: BlockList | null = null;

/** The client address of a request served by scripts/serve.mjs (null when there is no socket peer). */
export function clientAddressOf(request: Request, context: { peerAddress?: string | null } | undefined): string | null {
  trustedFromEnv ??= parseTrustedProxies(env.TRUSTED_PROXIES);
  return resolveClientAddress(context?.peerAddress, request.headers.get(env.CLIENT_IP_HEADER), trustedFromEnv);
}

/**
 * The request with CLIENT_ADDRESS_HEADER set to the resolved client (or removed when unknown), for
 * better-auth, which reads only that header. Whatever the client sent in it is never kept.
 */
export function withClientAddress(request: Request, context: { peerAddress?: string | null } | undefined): Request {
  const headers = new Headers(request.headers);
  const client = clientAddressOf(request, context);
  if (client) headers.set(CLIENT_ADDRESS_HEADER, client);
  else headers.delete(CLIENT_ADDRESS_HEADER);
  const hasBody = request.body !== null && request.method !== "GET" && request.method !== "HEAD";
  return new Request(request.url, {
    method: request.method,
    headers,
    body: hasBody ? request.body : undefined,
    signal: request.signal,
    ...(hasBody ? { duplex: "half" } : {}),
  } as RequestInit);
}
