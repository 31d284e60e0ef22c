// Where each instance lives and the environment the app gets (see "Environment contract" in DEVELOPERS.md).
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

export const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
export const dataDir = path.join(repoRoot, ".data");

/**
 * The two private instances: `npm start` (dev) and `npm test` (test). Ports never overlap.
 * RAKELINE_TEST_PORT_OFFSET shifts the test instance's three ports, so that several checkouts of the
 * repository (git worktrees) can run `npm test` side by side on one machine.
 */
const testPortOffset = Number(process.env.RAKELINE_TEST_PORT_OFFSET || 0);
if (!Number.isInteger(testPortOffset) || testPortOffset < 0 || testPortOffset > 1000) {
  throw new Error(`RAKELINE_TEST_PORT_OFFSET must be a whole number from 0 to 1000, not "${process.env.RAKELINE_TEST_PORT_OFFSET}"`);
}
export const instances = {
  dev: {
    name: "dev",
    datadir: path.join(dataDir, "db"),
    dbPort: 3307,
    database: "rakeline",
    passwordFile: path.join(dataDir, "db-password"),
    mailDir: path.join(dataDir, "mail"),
    uploadDir: path.join(dataDir, "uploads"),
    smtpPort: 2525,
    // The job worker's /healthz and /readyz (loopback).
    workerHealthPort: 3010,
    appHost: process.env.HOST || "127.0.0.1",
    appPort: Number(process.env.PORT || 3000),
  },
  test: {
    name: "test",
    datadir: path.join(dataDir, "test-db"),
    dbPort: 3308 + testPortOffset,
    database: "rakeline_test",
    passwordFile: path.join(dataDir, "test-db-password"),
    mailDir: path.join(dataDir, "test-mail"),
    uploadDir: path.join(dataDir, "test-uploads"),
    smtpPort: 2526 + testPortOffset,
    appHost: "127.0.0.1",
    appPort: 3100 + testPortOffset,
    // The S3-compatible fake (s3rver) the storage tests run against; its files in s3Dir, emptied each run.
    s3Port: 3600 + testPortOffset,
    workerHealthPort: 3700 + testPortOffset,
    s3Dir: path.join(dataDir, "test-s3"),
    s3Bucket: "rakeline-test",
  },
};

export const DB_USER = "rakeline";

/** A value generated once and kept in a git-ignored file under .data/ (mode 0600). */
export function readOrCreate(file, make) {
  if (existsSync(file)) {
    const value = readFileSync(file, "utf8").trim();
    if (value) return value;
  }
  mkdirSync(path.dirname(file), { recursive: true });
  const value = make();
  writeFileSync(file, `${value}\n`, { mode: 0o600 });
  return value;
}

/** Hex only, so it needs no quoting in SQL or URL escaping. */
export const randomHex = (bytes) => randomBytes(bytes).toString("hex");

export function developmentSecret(outside = process.env) {
  if (outside.BETTER_AUTH_SECRET) return outside.BETTER_AUTH_SECRET;
  return readOrCreate(path.join(dataDir, "secret"), () => randomHex(32));
}

const S3_VARIABLES = ["S3_BUCKET", "S3_ENDPOINT", "S3_REGION", "S3_ACCESS_KEY_ID", "S3_SECRET_ACCESS_KEY", "S3_FORCE_PATH_STYLE"];

function loopbackUrlHost(host) {
  return host === "0.0.0.0" || host === "::" ? "127.0.0.1" : host;
}

/**
 * The app's environment for an instance. For `npm start`, variables the person set (APP_URL, MAIL_FROM,
 * CLIENT_IP_HEADER, TRUSTED_PROXIES, AUTH_RATE_LIMIT, BETTER_AUTH_SECRET, HOST, PORT) win; the database and mail settings always
 * point at the private instance. `npm test` ignores outside values so every run is the same.
 */
export function appEnvironment(instance, { databaseUrl }) {
  const outside = instance.name === "dev" ? process.env : {};
  const appUrl = outside.APP_URL || `http://${loopbackUrlHost(instance.appHost)}:${instance.appPort}`;
  return {
    // React's production build (server renders cost several times less CPU than its development
    // build); the development mailbox stays on, since mail goes to the local catcher.
    NODE_ENV: "production",
    DEV_MAILBOX: "on",
    DATABASE_URL: databaseUrl,
    BETTER_AUTH_SECRET: developmentSecret(outside),
    APP_URL: appUrl,
    SMTP_URL: `smtp://127.0.0.1:${instance.smtpPort}`,
    MAIL_FROM: outside.MAIL_FROM || "Rakeline <no-reply@rakeline.local>",
    MAIL_CATCHER_DIR: instance.mailDir,
    CLIENT_IP_HEADER: outside.CLIENT_IP_HEADER || "x-forwarded-for",
    // Proxies (HAProxy, a TLS terminator) whose CLIENT_IP_HEADER is believed; none by default.
    TRUSTED_PROXIES: outside.TRUSTED_PROXIES || "",
    AUTH_RATE_LIMIT: instance.name === "test" ? "off" : outside.AUTH_RATE_LIMIT || "on",
    HOST: instance.appHost,
    PORT: String(instance.appPort),
    // Raw log files (app/server/storage.server.ts); S3_* variables from outside switch `npm start` to S3.
    UPLOAD_DIR: outside.UPLOAD_DIR || instance.uploadDir,
    ...Object.fromEntries(S3_VARIABLES.filter((name) => outside[name]).map((name) => [name, outside[name]])),
  };
}
