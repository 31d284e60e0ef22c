import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import { data } from "react-router";
import { z } from "zod";
import { env } from "./env.server";

// Reads the development/test mail catcher's files (<MAIL_CATCHER_DIR>/<id>.json, see DEVELOPERS.md).

export const messageIdSchema = z.string().regex(/^[A-Za-z0-9._-]{1,128}$/, "Not a message id.");

const messageSchema = z.object({
  id: z.string(),
  receivedAt: z.string(),
  from: z.string().nullish(),
  to: z.array(z.string()).default([]),
  subject: z.string().nullish(),
  text: z.string().nullish(),
  html: z.string().nullish(),
});
export type CaughtMessage = z.infer<typeof messageSchema>;

/** The mailbox exists only where DEV_MAILBOX is on (by default everywhere but NODE_ENV=production). */
export function requireDevMailbox(devMailbox: "on" | "off" = env.DEV_MAILBOX): void {
  if (devMailbox !== "on") throw data("There is nothing at this address.", { status: 404 });
}

function dir(): string {
  return path.resolve(env.MAIL_CATCHER_DIR);
}

export async function listMessages(): Promise<CaughtMessage[]> {
  let names: string[];
  try {
    names = (await readdir(dir())).filter((n) => n.endsWith(".json"));
  } catch {
    return []; // no catcher has written anything yet
  }
  const messages = await Promise.all(names.map((n) => readMessageFile(path.join(dir(), n))));
  return messages.filter((m): m is CaughtMessage => m !== null).sort((a, b) => b.receivedAt.localeCompare(a.receivedAt));
}

export async function getMessage(id: string): Promise<CaughtMessage | null> {
  const parsed = messageIdSchema.safeParse(id);
  if (!parsed.success) return null;
  return readMessageFile(path.join(dir(), `${parsed.data}.json`));
}

async function readMessageFile(file: string): Promise<CaughtMessage | null> {
  try {
    const parsed = messageSchema.safeParse(JSON.parse(await readFile(file, "utf8")));
    return parsed.success ? parsed.data : null;
  } catch {
    return null;
  }
}
