import { randomBytes } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import { isIP } from "node:net";
import { z } from "zod";

/** "127.0.0.1, 10.0.0.0/8, ::1": addresses and CIDR ranges of the proxies allowed to name the client. */
const proxyList = z.string().refine(
  (list) =>
    list
      .split(",")
      .map((s) => s.trim())
      .filter(Boolean)
      .every((entry) => {
        const [address, bits, extra] = entry.split("/");
        const family = isIP(address.replace(/^\[|\]$/g, ""));
        if (!family || extra !== undefined) return false;
        return bits === undefined || (/^\d+$/.test(bits) && Number(bits) <= (family === 6 ? 128 : 32));
      }),
  "TRUSTED_PROXIES must be a comma-separated list of IP addresses or CIDR ranges, e.g. 127.0.0.1,10.0.0.0/8",
);

// The environment contract lives in DEVELOPERS.md; this is its one parser.
const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().url().default("mysql://rakeline@127.0.0.1:3307/rakeline"),
  BETTER_AUTH_SECRET: z.string().min(32, "BETTER_AUTH_SECRET must be at least 32 characters").optional(),
  APP_URL: z.string().url().default("http://127.0.0.1:3000"),
  SMTP_URL: z.string().url().default("smtp://127.0.0.1:2525"),
  MAIL_FROM: z.string().min(3).default("Rakeline <no-reply@rakeline.local>"),
  MAIL_CATCHER_DIR: z.string().min(1).default(".data/mail"),
  CLIENT_IP_HEADER: z.string().min(1).default("x-forwarded-for"),
  TRUSTED_PROXIES: proxyList.default(""),
  AUTH_RATE_LIMIT: z.enum(["on", "off"]).default("on"),
  HOST: z.string().default("127.0.0.1"),
  PORT: z.coerce.number().int().positive().default(3000),
  // The development mailbox (/dev/mailbox). Default: on unless NODE_ENV=production. `npm start` and
  // `npm test` serve with NODE_ENV=production (React's production build renders several times faster)
  // and switch the mailbox on explicitly.
  DEV_MAILBOX: z.enum(["on", "off"]).optional(),
});

export type Env = Omit<z.infer<typeof envSchema>, "DEV_MAILBOX"> & { BETTER_AUTH_SECRET: string; DEV_MAILBOX: "on" | "off" };

const DEV_SECRET_FILE = ".data/secret";

export function parseEnv(source: Record<string, string | undefined>): Env {
  const cleaned = Object.fromEntries(Object.entries(source).filter(([, v]) => v !== undefined && v !== ""));
  const result = envSchema.safeParse(cleaned);
  if (!result.success) {
    const lines = result.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join("\n")}`);
  }
  const parsed = result.data;
  let secret = parsed.BETTER_AUTH_SECRET;
  if (!secret) {
    if (parsed.NODE_ENV === "production") {
      throw new Error("BETTER_AUTH_SECRET is required in production (at least 32 characters).");
    }
    // Development: the start script writes one into .data/; without it, sessions last until restart.
    secret = existsSync(DEV_SECRET_FILE)
      ? readFileSync(DEV_SECRET_FILE, "utf8").trim()
      : randomBytes(32).toString("hex");
  }
  const devMailbox = parsed.DEV_MAILBOX ?? (parsed.NODE_ENV === "production" ? "off" : "on");
  return { ...parsed, BETTER_AUTH_SECRET: secret, DEV_MAILBOX: devMailbox };
}

export const env: Env = parseEnv(process.env);
