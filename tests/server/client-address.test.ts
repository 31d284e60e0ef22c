// Which address an auth rate limit counts against. RFC 7239 §5.2 / common practice for X-Forwarded-For:
// each proxy appends the address it received the request from, so only the entries written by proxies we
// run can be believed, read from the right. RFC 5737 §3: 192.0.2.0/24, 198.51.100.0/24 and 203.0.113.0/24
// are documentation ranges; RFC 4291 §2.5.5.2: ::ffff:a.b.c.d is an IPv4 address on an IPv6 socket.
import { describe, expect, it } from "vitest";
import { normaliseAddress, parseTrustedProxies, resolveClientAddress } from "~/server/client-address.server";
import { parseEnv } from "~/server/env.server";

describe("client address", () => {
  const none = parseTrustedProxies("");
  const proxies = parseTrustedProxies("127.0.0.1, 10.0.0.0/8, ::1");

  it("is the socket's peer when no proxy is trusted, whatever header the client sends", () => {
    expect(resolveClientAddress("203.0.113.7", "198.51.100.1", none)).toBe("203.0.113.7");
    expect(resolveClientAddress("203.0.113.7", null, none)).toBe("203.0.113.7");
    expect(resolveClientAddress("::ffff:203.0.113.7", "198.51.100.1", none)).toBe("203.0.113.7");
  });

  it("ignores the header of a peer that is not a trusted proxy", () => {
    expect(resolveClientAddress("203.0.113.7", "198.51.100.1", proxies)).toBe("203.0.113.7");
  });

  it("reads a trusted proxy's header from the right, skipping our own proxies", () => {
    expect(resolveClientAddress("127.0.0.1", "198.51.100.4", proxies)).toBe("198.51.100.4");
    // The client wrote the first entry itself; our proxies appended the last two.
    expect(resolveClientAddress("127.0.0.1", "192.0.2.66, 198.51.100.4, 10.1.2.3", proxies)).toBe("198.51.100.4");
    expect(resolveClientAddress("::1", "2001:db8::5", proxies)).toBe("2001:db8::5");
    // A malformed hop stops the walk at the last address a proxy of ours vouched for.
    expect(resolveClientAddress("127.0.0.1", "not-an-address, 10.1.2.3", proxies)).toBe("10.1.2.3");
    expect(resolveClientAddress("127.0.0.1", null, proxies)).toBe("127.0.0.1");
  });

  it("has no address without a socket peer", () => {
    expect(resolveClientAddress(undefined, "198.51.100.4", proxies)).toBeNull();
    expect(normaliseAddress("[2001:db8::1]")).toBe("2001:db8::1");
    expect(normaliseAddress("localhost")).toBeNull();
  });

  it("refuses a malformed TRUSTED_PROXIES entry at start, naming it", () => {
    expect(() => parseTrustedProxies("127.0.0.1, 10.0.0.0/40")).toThrow(/10\.0\.0\.0\/40/);
    expect(() => parseEnv({ NODE_ENV: "development", TRUSTED_PROXIES: "proxy.internal" })).toThrow(/TRUSTED_PROXIES/);
    expect(parseEnv({ NODE_ENV: "development", TRUSTED_PROXIES: "127.0.0.1,10.0.0.0/8" }).TRUSTED_PROXIES).toBe("127.0.0.1,10.0.0.0/8");
  });
});
