// The environment parser against the contract table in DEVELOPERS.md ("Environment contract").
import { describe, expect, it } from "vitest";
import { parseEnv } from "~/server/env.server";

describe("environment", () => {
  it("fills the documented development defaults", () => {
    const env = parseEnv({ NODE_ENV: "development", BETTER_AUTH_SECRET: "s".repeat(32) });
    expect(env.APP_URL).toBe("http://127.0.0.1:3000");
    expect(env.SMTP_URL).toBe("smtp://127.0.0.1:2525");
    expect(env.MAIL_FROM).toBe("Rakeline <no-reply@rakeline.local>");
    expect(env.MAIL_CATCHER_DIR).toBe(".data/mail");
    expect(env.CLIENT_IP_HEADER).toBe("x-forwarded-for");
    expect(env.AUTH_RATE_LIMIT).toBe("on");
    // Loopback by default (issue 2, security baseline: the server binds loopback).
    expect(env.HOST).toBe("127.0.0.1");
    expect(env.PORT).toBe(3000);
  });

  it("requires BETTER_AUTH_SECRET in production and says so", () => {
    expect(() => parseEnv({ NODE_ENV: "production" })).toThrow(/BETTER_AUTH_SECRET is required in production/);
    expect(parseEnv({ NODE_ENV: "production", BETTER_AUTH_SECRET: "p".repeat(40) }).BETTER_AUTH_SECRET).toBe("p".repeat(40));
  });

  it("keeps the development mailbox off in production unless it is switched on", () => {
    const secret = "p".repeat(40);
    expect(parseEnv({ NODE_ENV: "development", BETTER_AUTH_SECRET: secret }).DEV_MAILBOX).toBe("on");
    expect(parseEnv({ NODE_ENV: "production", BETTER_AUTH_SECRET: secret }).DEV_MAILBOX).toBe("off");
    // npm start and npm test serve React's production build with the mailbox on.
    expect(parseEnv({ NODE_ENV: "production", BETTER_AUTH_SECRET: secret, DEV_MAILBOX: "on" }).DEV_MAILBOX).toBe("on");
    expect(() => parseEnv({ DEV_MAILBOX: "yes" })).toThrow(/DEV_MAILBOX/);
  });

  it("names the variable that is wrong", () => {
    // better-auth docs (Options, secret): at least 32 characters of high entropy (from memory).
    expect(() => parseEnv({ BETTER_AUTH_SECRET: "short" })).toThrow(/BETTER_AUTH_SECRET: BETTER_AUTH_SECRET must be at least 32/);
    expect(() => parseEnv({ APP_URL: "not a url" })).toThrow(/APP_URL/);
    expect(() => parseEnv({ AUTH_RATE_LIMIT: "maybe" })).toThrow(/AUTH_RATE_LIMIT/);
    expect(() => parseEnv({ PORT: "-1" })).toThrow(/PORT/);
  });
});
