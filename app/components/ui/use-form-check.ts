import { useState, type FormEvent } from "react";
import type { z } from "zod";
import { fieldErrors, type FieldErrors } from "~/lib/auth-schemas";

/**
 * Checks a form in the browser with the same zod schema its action uses, so a mistake is named
 * before the round trip. The server checks again; without JavaScript only the server does.
 */
export function useFormCheck(schema: z.ZodType, serverErrors: FieldErrors | undefined) {
  const [clientErrors, setClientErrors] = useState<FieldErrors | null>(null);
  const onSubmit = (event: FormEvent<HTMLFormElement>) => {
    const parsed = schema.safeParse(Object.fromEntries(new FormData(event.currentTarget)));
    if (parsed.success) {
      setClientErrors(null);
      return;
    }
    event.preventDefault();
    setClientErrors(fieldErrors(parsed.error));
  };
  return { errors: clientErrors ?? serverErrors ?? {}, onSubmit };
}
