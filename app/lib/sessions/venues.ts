/** The venue form (the team's venue list): name, altitude of the paddock (m), notes. */
import { z } from "zod";

const blank = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

export const venueSchema = z.object({
  name: z
    .string({ error: "Name the venue." })
    .transform((s) => s.normalize("NFC").trim())
    .pipe(z.string().min(1, "Name the venue.").max(80, "Keep the name to 80 characters.")),
  // The Dead Sea shore is about −430 m and the highest paved passes about 5,000 m (common practice).
  altitudeM: z.preprocess(
    (v) => {
      const b = blank(v);
      return typeof b === "string" ? (Number.isFinite(Number(b.replace(",", "."))) ? Number(b.replace(",", ".")) : b) : b;
    },
    z
      .number({ error: (i) => (i.input === undefined ? "Altitude is required." : `Altitude: "${String(i.input)}" is not a number.`) })
      .min(-500, "Altitude must be between −500 and 5000 m.")
      .max(5000, "Altitude must be between −500 and 5000 m.")
      .nullable()
      .default(null),
  ),
  notes: z.preprocess(
    blank,
    z
      .string()
      .transform((s) => s.normalize("NFC").trim())
      .pipe(z.string().max(200, "Keep the notes to 200 characters."))
      .nullable()
      .default(null),
  ),
});
