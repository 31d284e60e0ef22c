// Read the mail catcher's messages (one JSON file each, see DEVELOPERS.md) from tests.
import { existsSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import type { CaughtMessage } from "../../../scripts/lib/mail-catcher.mjs";

/** A stored message, as the catcher writes it. */
export type CaughtMail = CaughtMessage;

/** The catcher directory of this run: MAIL_CATCHER_DIR (set by npm test), else the test default. */
export const mailCatcherDir = path.resolve(process.env.MAIL_CATCHER_DIR ?? ".data/test-mail");

/** Every stored message, oldest first (file names sort in arrival order). */
export function listMessages(dir: string = mailCatcherDir): CaughtMail[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir)
    .filter((name) => name.endsWith(".json"))
    .sort()
    .map((name) => JSON.parse(readFileSync(path.join(dir, name), "utf8")) as CaughtMail);
}

/** Poll the directory until a message matches; the newest match wins. Rejects with what was seen on timeout. */
export async function waitForMessage(
  dir: string,
  predicate: (message: CaughtMail) => boolean,
  timeoutMs = 10_000,
): Promise<CaughtMail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const match = listMessages(dir).filter(predicate).at(-1);
    if (match) return match;
    if (Date.now() > deadline) {
      const seen = listMessages(dir).map((m) => `${m.to.join(",")}: ${m.subject}`);
      throw new Error(`no matching mail in ${dir} within ${timeoutMs} ms; saw ${seen.length ? seen.join(" | ") : "none"}`);
    }
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
}

/** The newest message addressed to this address (case-insensitive), waiting for it to arrive. */
export function waitForMailTo(address: string, timeoutMs = 10_000, dir: string = mailCatcherDir): Promise<CaughtMail> {
  const wanted = address.toLowerCase();
  return waitForMessage(dir, (m) => m.to.some((to) => to.toLowerCase() === wanted), timeoutMs);
}

/** The first http(s) link in the text part that starts with the given base URL (e.g. APP_URL). */
export function firstLink(message: CaughtMail, baseURL: string): string {
  const links = message.text.match(/https?:\/\/[^\s<>"')\]]+/g) ?? [];
  const link = links.find((candidate) => candidate.startsWith(baseURL));
  if (!link) throw new Error(`mail "${message.subject}" has no link starting with ${baseURL}; links: ${links.join(", ") || "none"}`);
  return link;
}
