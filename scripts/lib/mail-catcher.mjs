// A local SMTP catcher for development and tests: loopback only, no auth, accepts every message and keeps
// each one as <dir>/<id>.json = { id, receivedAt, from, to: [..], subject, text, html }.
// Standalone: node scripts/lib/mail-catcher.mjs [--port 2525] [--host 127.0.0.1] [--dir .data/mail]
import { randomBytes } from "node:crypto";
import { mkdirSync, renameSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

const LOOPBACK = new Set(["127.0.0.1", "::1", "localhost"]);
const MAX_MESSAGE_BYTES = 25 * 1024 * 1024;

let sequence = 0;

/** File names sort in arrival order: compact ISO time, a per-process sequence number, a random suffix. */
function messageId(receivedAt) {
  sequence += 1;
  return `${receivedAt.replace(/[-:.]/g, "")}-${String(sequence).padStart(6, "0")}-${randomBytes(3).toString("hex")}`;
}

function collect(stream) {
  return new Promise((resolve, reject) => {
    const chunks = [];
    stream.on("data", (chunk) => chunks.push(chunk));
    stream.on("end", () => resolve(Buffer.concat(chunks)));
    stream.on("error", reject);
  });
}

/** Parse one raw RFC 5322 message and store it; the write is atomic (temp file, then rename). */
async function store(dir, raw, envelope, PostalMime) {
  const parsed = await PostalMime.parse(raw);
  const receivedAt = new Date().toISOString();
  const id = messageId(receivedAt);
  const message = {
    id,
    receivedAt,
    from: parsed.from?.address || envelope.mailFrom?.address || "",
    to: envelope.rcptTo.map((recipient) => recipient.address),
    subject: parsed.subject ?? "",
    text: parsed.text ?? "",
    html: parsed.html ?? "",
  };
  const file = path.join(dir, `${id}.json`);
  writeFileSync(`${file}.tmp`, `${JSON.stringify(message, null, 2)}\n`);
  renameSync(`${file}.tmp`, file);
  return message;
}

/**
 * Start the catcher. port 0 picks a free port. Resolves with { host, port, dir, close() }.
 * onMessage (optional) is called with each stored message.
 */
export async function startMailCatcher({ host = "127.0.0.1", port = 2525, dir, onMessage } = {}) {
  if (!dir) throw new Error("startMailCatcher needs a dir to store messages in");
  if (!LOOPBACK.has(host)) throw new Error(`the mail catcher listens on loopback only, not on ${host}`);
  mkdirSync(dir, { recursive: true });
  // Loaded on call: this file is imported by scripts that run before `npm ci` on a fresh clone.
  const smtp = await import("smtp-server");
  const SMTPServer = smtp.SMTPServer ?? smtp.default.SMTPServer;
  const PostalMime = (await import("postal-mime")).default;

  const server = new SMTPServer({
    authOptional: true,
    // No TLS offer: the catcher has no certificate, and a client would try STARTTLS if offered.
    disabledCommands: ["AUTH", "STARTTLS"],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: "Rakeline mail catcher (development only)",
    onData(stream, session, callback) {
      collect(stream)
        .then((raw) => store(dir, raw, session.envelope, PostalMime))
        .then((message) => {
          onMessage?.(message);
          callback();
        })
        .catch((error) => callback(Object.assign(new Error(`catcher could not store the message: ${error.message}`), { responseCode: 451 })));
    },
  });
  server.on("error", (error) => console.error(`[mail-catcher] ${error.message}`));

  await new Promise((resolve, reject) => {
    const onError = (error) => reject(error.code === "EADDRINUSE" ? new Error(`${host}:${port} is already in use; is another catcher running?`) : error);
    server.server.once("error", onError);
    server.listen(port, host, () => {
      server.server.off("error", onError);
      resolve();
    });
  });
  const address = server.server.address();
  return {
    host,
    port: address.port,
    dir,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

function argValue(args, name, fallback) {
  const index = args.indexOf(`--${name}`);
  return index >= 0 && args[index + 1] ? args[index + 1] : fallback;
}

async function main() {
  const args = process.argv.slice(2);
  const dir = path.resolve(argValue(args, "dir", process.env.MAIL_CATCHER_DIR || ".data/mail"));
  const port = Number(argValue(args, "port", "2525"));
  const host = argValue(args, "host", "127.0.0.1");
  if (!Number.isInteger(port) || port < 0 || port > 65535) throw new Error(`--port must be a port number, not ${port}`);
  const catcher = await startMailCatcher({
    host, port, dir,
    onMessage: (message) => console.log(`[mail-catcher] ${message.to.join(", ")}: ${message.subject}`),
  });
  console.log(`[mail-catcher] listening on ${catcher.host}:${catcher.port}, writing ${dir}`);
  const stop = () => catcher.close().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((error) => {
    console.error(`[mail-catcher] ${error.message}`);
    process.exit(1);
  });
}
