// The lifecycle scripts' own logic: the mail catcher stores what nodemailer sends, and the
// node_modules staleness check reads npm's hidden lockfile the way npm documents it.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startMailCatcher, type RunningCatcher } from "../../scripts/lib/mail-catcher.mjs";
import { staleReason } from "../../scripts/lib/deps.mjs";
import { firstLink, listMessages, waitForMessage } from "./helpers/mail";

describe("mail catcher", () => {
  let dir: string;
  let catcher: RunningCatcher;

  beforeAll(async () => {
    dir = mkdtempSync(path.join(os.tmpdir(), "rakeline-catcher-"));
    catcher = await startMailCatcher({ port: 0, dir });
  });

  afterAll(async () => {
    await catcher?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  it("stores each message nodemailer sends as parsed JSON", async () => {
    const transport = nodemailer.createTransport({ host: "127.0.0.1", port: catcher.port, secure: false });
    const info = await transport.sendMail({
      from: "Harrowgate Motor Club <secretary@harrowgate.example>",
      to: ["Dana Pike <dana@harrowgate.example>", "crew@harrowgate.example"],
      subject: "Kestrel Bank Raceway: stint 3 notes — Ø 3.1 km",
      text: "Open http://127.0.0.1:3100/verify?token=abc123 to confirm.",
      html: "<p>Open <a href=\"http://127.0.0.1:3100/verify?token=abc123\">this link</a>.</p>",
    });
    // nodemailer docs (SMTP transport): info.accepted lists the recipients the server took.
    expect(info.accepted).toEqual(["dana@harrowgate.example", "crew@harrowgate.example"]);

    const message = await waitForMessage(dir, (m) => m.subject.startsWith("Kestrel Bank Raceway"));
    // RFC 5321 §3.3: the envelope recipients (RCPT TO) are bare addresses, one per recipient.
    expect(message.to).toEqual(["dana@harrowgate.example", "crew@harrowgate.example"]);
    // RFC 5322 §3.6.2: the From header's address; the display name is not part of it.
    expect(message.from).toBe("secretary@harrowgate.example");
    // RFC 2047 encoded-words must decode back to the original UTF-8 subject.
    expect(message.subject).toBe("Kestrel Bank Raceway: stint 3 notes — Ø 3.1 km");
    expect(message.text.trim()).toBe("Open http://127.0.0.1:3100/verify?token=abc123 to confirm.");
    expect(message.html).toContain('href="http://127.0.0.1:3100/verify?token=abc123"');
    // ISO 8601 / ECMAScript Date Time String Format: toISOString() round-trips.
    expect(new Date(message.receivedAt).toISOString()).toBe(message.receivedAt);
    expect(firstLink(message, "http://127.0.0.1:3100")).toBe("http://127.0.0.1:3100/verify?token=abc123");
  });

  it("keeps every message, oldest first", async () => {
    const transport = nodemailer.createTransport({ host: "127.0.0.1", port: catcher.port, secure: false });
    for (const lap of [1, 2, 3]) {
      await transport.sendMail({ from: "a@harrowgate.example", to: "b@harrowgate.example", subject: `lap ${lap}`, text: "x" });
    }
    const laps = listMessages(dir).filter((m) => m.subject.startsWith("lap ")).map((m) => m.subject);
    expect(laps).toEqual(["lap 1", "lap 2", "lap 3"]);
  });

  it("refuses to listen on a non-loopback address", async () => {
    await expect(startMailCatcher({ host: "0.0.0.0", port: 0, dir })).rejects.toThrow(/loopback only/);
  });
});

describe("node_modules staleness (npm docs, package-lock.json: hidden lockfile node_modules/.package-lock.json)", () => {
  let root: string;
  const lock = (packages: Record<string, object>) => JSON.stringify({ lockfileVersion: 3, packages: { "": {}, ...packages } });

  beforeAll(() => {
    root = mkdtempSync(path.join(os.tmpdir(), "rakeline-deps-"));
  });
  afterAll(() => rmSync(root, { recursive: true, force: true }));

  it("asks for npm ci when node_modules is missing, outdated or incomplete, and not when it matches", () => {
    writeFileSync(path.join(root, "package-lock.json"), lock({
      "node_modules/zod": { version: "4.6.7" },
      // npm docs: optional dependencies for another platform are skipped at install.
      "node_modules/@esbuild/win32-x64": { version: "0.25.0", optional: true },
    }));
    expect(staleReason(root)).toMatch(/node_modules is missing/);

    mkdirSync(path.join(root, "node_modules"));
    expect(staleReason(root)).toMatch(/no record/);

    const hidden = path.join(root, "node_modules", ".package-lock.json");
    writeFileSync(hidden, lock({ "node_modules/zod": { version: "4.0.0" } }));
    expect(staleReason(root)).toMatch(/zod is 4\.0\.0, the lockfile wants 4\.6\.7/);

    writeFileSync(hidden, lock({}));
    expect(staleReason(root)).toMatch(/zod is not installed/);

    writeFileSync(hidden, lock({ "node_modules/zod": { version: "4.6.7" } }));
    expect(staleReason(root)).toBeNull();
  });
});
