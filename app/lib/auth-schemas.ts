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

const name = z
  .string({ error: "Enter your name." })
  .trim()
  .min(1, "Enter your name.")
  .max(100, "The name is too long: use at most 100 characters.");

const nextPath = z
  .string()
  .optional()
  .transform((v) => safeNext(v));

/** Only same-site paths are followed after sign-in; anything else goes to the start page. */
export function safeNext(value: string | null | undefined): string | undefined {
  if (!value || !value.startsWith("/") || value.startsWith("//") || value.startsWith("/\\")) return undefined;
  return value;
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
