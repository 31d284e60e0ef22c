// Open redirect: `next` after sign-in must stay on this site as the browser will read it. WHATWG URL
// Standard, basic URL parser: ASCII tab and newline are removed from the input, and "\" counts as "/" in
// special schemes; so "/\t/host" is "//host", a scheme-relative URL to another host.
import { describe, expect, it } from "vitest";
import { safeNext } from "~/lib/auth-schemas";

describe("safeNext", () => {
  it("refuses every value a browser would follow off-site", () => {
    const offSite = [
      "/\t/evil.example/path", // the probe's /%09/host/path, after the query string is decoded
      "/\n/evil.example",
      "/\r\n/evil.example",
      "//evil.example",
      "/\\evil.example",
      "/\\\\evil.example",
      "/\t\\evil.example",
      "https://evil.example/",
      "javascript:alert(1)",
      "evil.example",
      "",
    ];
    for (const value of offSite) expect(safeNext(value), JSON.stringify(value)).toBeUndefined();
    expect(safeNext(null)).toBeUndefined();
    expect(safeNext(undefined)).toBeUndefined();
  });

  it("keeps same-site paths, re-encoded as the browser sends them", () => {
    expect(safeNext("/t/harrowgate/garage?sort=name#top")).toBe("/t/harrowgate/garage?sort=name#top");
    expect(safeNext("/invitations/abc")).toBe("/invitations/abc");
    // RFC 3986 §5.2.4: dot segments are removed; the result is still a path on this site.
    expect(safeNext("/t/a/../b")).toBe("/t/b");
    // A control character inside a path is dropped (tab) or percent-encoded, never passed through raw.
    expect(safeNext("/t/a\tb")).toBe("/t/ab");
    expect(safeNext("/t/a b")).toBe("/t/a%20b");
  });
});
