import busboy from "busboy";
import { data } from "react-router";
import { isResourceRequest } from "./session.server";

// Reading request bodies with limits, before anything is parsed. Every action that reads a body uses one of
// these instead of request.formData() / request.text() / request.json(), which read any size and any depth:
//   readForm(request, limits?)   a form (url-encoded or multipart), fields and small files, each capped
//   readText(request, maxBytes)  a text body (e.g. a CAR.json posted to a resource route)
//   readJson(request, limits?)   a JSON body, with a nesting-depth limit checked before JSON.parse
// A refusal is thrown: 413 (too large), 415 (not a form) or 400 (too deep / not JSON), as JSON on /api/ routes
// and as `data(message, { status })` for a page's error boundary. scripts/lib/http-server.mjs caps
// non-multipart bodies at 1 MiB before any of this runs; multipart bodies are capped here or by an upload route.

export type FormLimits = {
  /** The whole body. */
  maxBytes: number;
  /** One text field's value. */
  maxFieldBytes: number;
  maxFields: number;
  /** One file's size; files are kept in memory, so this stays small (uploads stream elsewhere). */
  maxFileBytes: number;
  maxFiles: number;
};

export const DEFAULT_FORM_LIMITS: FormLimits = {
  maxBytes: 256 * 1024,
  maxFieldBytes: 32 * 1024,
  maxFields: 400,
  maxFileBytes: 0,
  maxFiles: 0,
};

export const DEFAULT_JSON_DEPTH = 32;

export type FormFile = { fileName: string; type: string; bytes: Buffer };
export type ReadFormResult = { fields: Record<string, string>; files: Record<string, FormFile> };

function kib(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${Math.round(bytes / (1024 * 1024))} MiB` : `${Math.max(1, Math.round(bytes / 1024))} KiB`;
}

/** What to throw for a refused body, in the form the route kind expects. */
export function bodyRefusal(request: Request, status: 400 | 413 | 415, message: string) {
  if (isResourceRequest(request)) return Response.json({ error: message }, { status });
  return data(message, { status });
}

/** The message of a refusal thrown by these readers for a page (not /api/), so a form can show it in place. */
export function pageRefusalMessage(error: unknown): { status: number; message: string } | null {
  const e = error as { type?: string; data?: unknown; init?: { status?: number } } | null;
  if (e && e.type === "DataWithResponseInit" && typeof e.data === "string" && [400, 413, 415].includes(e.init?.status ?? 0)) {
    return { status: e.init!.status!, message: e.data };
  }
  return null;
}

function declaredTooLarge(request: Request, maxBytes: number): boolean {
  const declared = Number(request.headers.get("content-length"));
  return Number.isFinite(declared) && declared > maxBytes;
}

/** The body's bytes, reading no more than maxBytes + 1 of them; null when it is larger. */
async function readCapped(request: Request, maxBytes: number): Promise<Buffer | null> {
  if (!request.body) return Buffer.alloc(0);
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let seen = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    seen += value.byteLength;
    if (seen > maxBytes) {
      await reader.cancel().catch(() => undefined);
      return null;
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks);
}

/** A text body of at most maxBytes (UTF-8, a leading BOM removed). */
export async function readText(request: Request, maxBytes: number): Promise<string> {
  const tooLarge = () => bodyRefusal(request, 413, `The request body is larger than ${kib(maxBytes)}.`);
  if (declaredTooLarge(request, maxBytes)) throw tooLarge();
  const bytes = await readCapped(request, maxBytes);
  if (bytes === null) throw tooLarge();
  return bytes.toString("utf8").replace(/^\uFEFF/, "");
}

/**
 * Refuses JSON nested deeper than maxDepth before JSON.parse sees it: a body of a million brackets costs a
 * linear scan here, not the parser's and the validator's time and memory.
 */
export function jsonDepthProblem(text: string, maxDepth = DEFAULT_JSON_DEPTH): string | null {
  let depth = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === 92 /* \ */) i++;
      else if (c === 34 /* " */) inString = false;
    } else if (c === 34) inString = true;
    else if (c === 91 /* [ */ || c === 123 /* { */) {
      if (++depth > maxDepth) return `The JSON is nested more than ${maxDepth} levels deep (at character ${i + 1}).`;
    } else if (c === 93 /* ] */ || c === 125 /* } */) depth--;
  }
  return null;
}

export type JsonParse = { ok: true; value: unknown } | { ok: false; message: string };

/** JSON.parse behind the depth check; the message names what is wrong. */
export function parseJsonBounded(text: string, maxDepth = DEFAULT_JSON_DEPTH): JsonParse {
  const deep = jsonDepthProblem(text, maxDepth);
  if (deep) return { ok: false, message: deep };
  try {
    return { ok: true, value: JSON.parse(text) };
  } catch (error) {
    return { ok: false, message: `The text is not valid JSON (${(error as Error).message}).` };
  }
}

/** A JSON body of at most maxBytes and maxDepth; a refusal (400/413) is thrown. */
export async function readJson(request: Request, limits: { maxBytes?: number; maxDepth?: number } = {}): Promise<unknown> {
  const text = await readText(request, limits.maxBytes ?? 256 * 1024);
  const parsed = parseJsonBounded(text, limits.maxDepth ?? DEFAULT_JSON_DEPTH);
  if (!parsed.ok) throw bodyRefusal(request, 400, parsed.message);
  return parsed.value;
}

const FORM_TYPES = ["application/x-www-form-urlencoded", "multipart/form-data"];

/**
 * A posted form, every part capped: the whole body, each field, the number of fields, each file and the
 * number of files. Field values are the text as sent (schemas trim and normalise what they keep).
 */
export async function readForm(request: Request, overrides: Partial<FormLimits> = {}): Promise<ReadFormResult> {
  const limits = { ...DEFAULT_FORM_LIMITS, ...overrides };
  const contentType = request.headers.get("content-type") ?? "";
  const mediaType = contentType.split(";")[0].trim().toLowerCase();
  if (!FORM_TYPES.includes(mediaType)) {
    throw bodyRefusal(request, 415, "Send this as a form (application/x-www-form-urlencoded or multipart/form-data).");
  }
  if (declaredTooLarge(request, limits.maxBytes)) {
    throw bodyRefusal(request, 413, `The form is larger than ${kib(limits.maxBytes)}.`);
  }
  const bytes = await readCapped(request, limits.maxBytes);
  if (bytes === null) throw bodyRefusal(request, 413, `The form is larger than ${kib(limits.maxBytes)}.`);

  return new Promise<ReadFormResult>((resolve, reject) => {
    const fields: Record<string, string> = {};
    const files: Record<string, FormFile> = {};
    let refused = false;
    const refuse = (status: 400 | 413, message: string) => {
      if (refused) return;
      refused = true;
      reject(bodyRefusal(request, status, message));
    };
    let parser: busboy.Busboy;
    try {
      parser = busboy({
        headers: { "content-type": contentType },
        defCharset: "utf8",
        defParamCharset: "utf8",
        limits: {
          fieldNameSize: 200,
          fieldSize: limits.maxFieldBytes,
          fields: limits.maxFields,
          fileSize: limits.maxFileBytes,
          files: limits.maxFiles,
          parts: limits.maxFields + Math.max(1, limits.maxFiles),
        },
      });
    } catch (error) {
      refuse(400, `The form could not be read (${(error as Error).message}).`);
      return;
    }
    parser.on("field", (name, value, info) => {
      if (info.nameTruncated) refuse(413, "A field name of the form is too long.");
      else if (info.valueTruncated) refuse(413, `The field "${name}" is longer than ${kib(limits.maxFieldBytes)}.`);
      else fields[name] = value;
    });
    parser.on("file", (name, stream, info) => {
      const chunks: Buffer[] = [];
      stream.on("data", (chunk: Buffer) => chunks.push(chunk));
      stream.on("limit", () => refuse(413, `The file "${info.filename || name}" is larger than ${kib(limits.maxFileBytes)}.`));
      stream.on("close", () => {
        const content = Buffer.concat(chunks);
        // An empty file input still sends a part with no name and no bytes: that is "no file".
        if (!info.filename && content.length === 0) return;
        files[name] = { fileName: info.filename ?? "", type: info.mimeType, bytes: content };
      });
    });
    parser.on("fieldsLimit", () => refuse(413, `The form has more than ${limits.maxFields} fields.`));
    parser.on("filesLimit", () => {
      if (limits.maxFiles === 0) return; // forms without a file input: a stray file part is ignored
      refuse(413, `The form has more than ${limits.maxFiles} file${limits.maxFiles === 1 ? "" : "s"}.`);
    });
    parser.on("partsLimit", () => refuse(413, "The form has too many parts."));
    parser.on("error", (error: Error) => refuse(400, `The form could not be read (${error.message}).`));
    parser.on("close", () => {
      if (!refused) resolve({ fields, files });
    });
    parser.end(bytes);
  });
}

/** readForm's fields only: the drop-in for `Object.fromEntries(await request.formData())`. */
export async function readFormFields(request: Request, overrides: Partial<FormLimits> = {}): Promise<Record<string, string>> {
  return (await readForm(request, overrides)).fields;
}
