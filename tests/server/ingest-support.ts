// Ingest tests: a team of its own per test file (so the same demo log is new to it), its owner signed in,
// and the demo car imported from sample-data/cars/ (the same car file the CLI reads).
import { randomBytes, randomUUID } from "node:crypto";
import { createReadStream, readFileSync } from "node:fs";
import { hashPassword } from "better-auth/crypto";
import { account, member, organization, user } from "~/db/schema/auth";
import { analyseLog } from "~/engine/analyse";
import { validateCar } from "~/engine/car";
import type { SummaryOptions } from "~/engine/summary-options";
import { db } from "~/server/db.server";
import { exportCarInput, importCarFile } from "~/server/garage-io.server";
import { appUrl, authCall, CookieJar } from "./auth-support";

export const LOGS = "sample-data/logs";

export async function ingestWorld(label = "ingest") {
  const run = randomBytes(4).toString("hex");
  const email = `${label}.${run}@pitwall.example`;
  const password = "paddock-lane-2026";
  const userId = randomUUID();
  const teamId = randomUUID();
  const slug = `${label}-${run}`;
  const now = new Date();
  await db.insert(user).values({ id: userId, email, name: "Orla Penhallow", emailVerified: true, createdAt: now, updatedAt: now });
  await db.insert(account).values({ id: randomUUID(), accountId: userId, providerId: "credential", userId, password: await hashPassword(password), createdAt: now, updatedAt: now });
  await db.insert(organization).values({ id: teamId, name: `Ingest ${run}`, slug, createdAt: now });
  await db.insert(member).values({ id: randomUUID(), organizationId: teamId, userId, role: "owner", createdAt: now });
  const jar = new CookieJar();
  const signIn = await authCall("/sign-in/email", { json: { email, password }, jar });
  if (signIn.status !== 200) throw new Error(`sign-in failed: ${signIn.status}`);
  const cars: Record<string, { carId: string; setupId: string }> = {};
  for (const name of ["marlin-sr2", "vesper-gt4r"]) {
    const imported = await importCarFile(teamId, userId, readFileSync(`sample-data/cars/${name}.json`, "utf8"), "Baseline");
    if (!imported.ok) throw new Error(`import of ${name} failed: ${JSON.stringify(imported)}`);
    cars[name] = { carId: imported.carId, setupId: imported.setupId };
  }
  return { userId, teamId, slug, team: { id: teamId, slug }, jar, email, password, cars };
}

/** The browser's side: the engine on the file with the car file the Garage exports (as the Drop a log worker runs it). */
export async function browserSummary(teamId: string, car: { carId: string; setupId: string }, logPath: string, map: unknown, options: SummaryOptions = {}) {
  const { car: carFile } = await exportCarInput(teamId, car.carId, car.setupId);
  return analyseLog(createReadStream(logPath), validateCar(carFile), map as never, options);
}

export function mapOf(log: string): Record<string, unknown> {
  return JSON.parse(readFileSync(`${LOGS}/${log}.map.json`, "utf8"));
}

/** A multipart upload as Uppy's xhr-upload sends it (one part "file"). */
export function uploadRequest(slug: string, jar: CookieJar | null, fileName: string, bytes: Uint8Array, extra: Record<string, string> = {}): Request {
  const form = new FormData();
  form.set("file", new File([new Uint8Array(bytes)], fileName, { type: "text/csv" }));
  const headers = new Headers({ origin: appUrl, ...extra });
  if (jar) headers.set("cookie", jar.header());
  return new Request(`${appUrl}/api/t/${slug}/uploads`, { method: "POST", headers, body: form });
}

/** The opening of a multipart form's one part "file" (Uppy's field name), before the file's bytes. */
export function multipartFileHead(boundary: string, fileName: string): Uint8Array {
  return new Uint8Array(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${fileName}"\r\nContent-Type: text/csv\r\n\r\n`));
}

/** The end of that form, after the file's bytes. */
export function multipartTail(boundary: string): Uint8Array {
  return new Uint8Array(Buffer.from(`\r\n--${boundary}--\r\n`));
}

/** An upload to the team's upload route whose multipart body the test streams itself (a slow or vanishing client). */
export function streamedUploadRequest(slug: string, jar: CookieJar, boundary: string, body: ReadableStream<Uint8Array>): Request {
  return new Request(`${appUrl}/api/t/${slug}/uploads`, {
    method: "POST",
    headers: { origin: appUrl, cookie: jar.header(), "content-type": `multipart/form-data; boundary=${boundary}` },
    body,
    duplex: "half",
  } as RequestInit);
}

export function jsonPost(path: string, body: unknown, jar: CookieJar): Request {
  return new Request(`${appUrl}${path}`, {
    method: "POST",
    headers: { origin: appUrl, "content-type": "application/json", cookie: jar.header() },
    body: JSON.stringify(body),
  });
}
