import { z } from "zod";

// Form schemas shared by the pages (client) and their actions (server).
export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 128;

const email = z
  .string({ error: "Enter your e-mail address." })
  .trim()
  .min(1, "Enter your e-mail address.")
  .pipe(z.email({ error: "That is not a valid e-mail address (expected something like name@example.com)." }))
  .transform((v) => v.toLowerCase());

const newPassword = z
  .string({ error: "Choose a password." })
  .min(PASSWORD_MIN, `The password is too short: use at least ${PASSWORD_MIN} characters.`)
  .max(PASSWORD_MAX, `The password is too long: use at most ${PASSWORD_MAX} characters.`);

/** A person's name as stored: NFC-normalised and trimmed before it is checked, so what is checked is what is kept. */
export const personName = z
  .string({ error: "Enter your name." })
  .normalize("NFC")
  .trim()
  .min(1, "Enter your name.")
  .max(100, "The name is too long: use at most 100 characters.");
const name = personName;

const nextPath = z
  .string()
  .optional()
  .transform((v) => safeNext(v));

const NEXT_BASE = "http://rakeline.invalid";

/**
 * Where to go after signing in: only a path on this site. The value is parsed as a browser would parse it
 * (tabs and newlines dropped, backslashes read as slashes), and kept only if it stays on this origin; the
 * parsed, re-encoded path is returned, so what is checked is exactly what the browser will follow.
 */
export function safeNext(value: string | null | undefined): string | undefined {
  if (typeof value !== "string" || !value.startsWith("/") || value.length > 2000) return undefined;
  let url: URL;
  try {
    url = new URL(value, NEXT_BASE);
  } catch {
    return undefined;
  }
  if (url.origin !== NEXT_BASE) return undefined;
  const path = `${url.pathname}${url.search}${url.hash}`;
  // "//x" or "/\\x" as a Location would leave the site again (protocol-relative).
  if (!path.startsWith("/") || path.startsWith("//") || path.startsWith("/\\")) return undefined;
  return path;
}

export const signUpSchema = z
  .object({ name, email, password: newPassword, confirmPassword: z.string(), next: nextPath })
  .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords do not match." });

export const signInSchema = z.object({
  email,
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password."),
  next: nextPath,
});

export const forgotPasswordSchema = z.object({ email });

export const resetPasswordSchema = z
  .object({ token: z.string().min(1, "The reset link is incomplete; request a new one."), password: newPassword, confirmPassword: z.string() })
  .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords do not match." });

export const changePasswordSchema = z
  .object({ currentPassword: z.string().min(1, "Enter your current password."), password: newPassword, confirmPassword: z.string() })
  .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords do not match." });

export const profileSchema = z.object({ name });

export type FieldErrors = Record<string, string>;

/** First message per field, keyed by the field name; form-level messages under "form". */
export function fieldErrors(error: z.ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? String(issue.path[0]) : "form";
    out[key] ??= issue.message;
  }
  return out;
}
