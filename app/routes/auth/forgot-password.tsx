import { data, Form, Link, useNavigation } from "react-router";
import { AuthCard } from "~/components/ui/panels";
import { Button, Field, FormAlert } from "~/components/ui/form";
import { fieldErrors, forgotPasswordSchema } from "~/lib/auth-schemas";
import { requestPasswordReset } from "~/server/auth-forms.server";
import { readFormFields } from "~/server/body.server";
import { useFormCheck } from "~/components/ui/use-form-check";
import type { Route } from "./+types/forgot-password";

export async function action({ request, context }: Route.ActionArgs) {
  const form = await readFormFields(request);
  const parsed = forgotPasswordSchema.safeParse(form);
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error), sentTo: null }, { status: 400 });
  // The same answer at once for every address; the work happens after it (see requestPasswordReset).
  requestPasswordReset({ request, context }, parsed.data.email);
  return { errors: {} as Record<string, string>, sentTo: parsed.data.email };
}

export default function ForgotPassword({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const { errors, onSubmit } = useFormCheck(forgotPasswordSchema, actionData?.errors as Record<string, string> | undefined);
  if (actionData?.sentTo) {
    return (
      <AuthCard title="Check your e-mail" footer={<Link className="text-accent underline" to="/sign-in">Back to sign in</Link>}>
        <p className="text-ink-soft">
          If an account uses <strong className="text-ink">{actionData.sentTo}</strong>, a link to choose a new password is on its way.
          It is valid for one hour.
        </p>
      </AuthCard>
    );
  }
  return (
    <AuthCard title="Reset your password" footer={<Link className="text-accent underline" to="/sign-in">Back to sign in</Link>}>
      <Form method="post" noValidate onSubmit={onSubmit}>
        <p className="mb-4 text-sm text-ink-soft">Enter the e-mail address of your account; we send a link to choose a new password.</p>
        <FormAlert>{errors.form}</FormAlert>
        <Field label="E-mail" name="email" type="email" autoComplete="email" required error={errors.email} />
        <Button busy={busy} className="w-full">Send reset link</Button>
      </Form>
    </AuthCard>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Reset password · Rakeline" }];
