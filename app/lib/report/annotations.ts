/** Input of a note on a session or band, and of a saved comparison (shared by the forms and the server). */
import { z } from "zod";

const text = (max: number, what: string) =>
  z
    .string()
    .transform((s) => s.normalize("NFC").trim())
    .pipe(z.string().min(1, `Write ${what}.`).max(max, `Keep ${what} under ${max} characters.`));

/** `band` is "" (whole session) or "<min>-<max>" in km/h, one of the session's bands. */
export const annotationSchema = z.object({
  body: text(500, "the note"),
  band: z
    .string()
    .regex(/^$|^\d+(\.\d+)?-\d+(\.\d+)?$/, "Choose a speed band or the whole session.")
    .default(""),
});

/** Editing or deleting a note (the report page's intents edit-note and delete-note). */
export const noteChangeSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("edit-note"), noteId: z.string().min(1).max(36), body: text(500, "the note") }),
  z.object({ intent: z.literal("delete-note"), noteId: z.string().min(1).max(36), body: z.string().optional() }),
]);

export const saveComparisonSchema = z.object({
  name: text(80, "a name"),
  ids: z
    .string()
    .transform((s) => [...new Set(s.split(",").map((x) => x.trim()).filter(Boolean))])
    .pipe(z.array(z.string().max(36)).min(2, "Pick at least two sessions before saving.").max(8, "Save at most 8 sessions.")),
});

export function bandKey(min: number, max: number): string {
  return `${min}-${max}`;
}
