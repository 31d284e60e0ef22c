import { data, Form, Link, useNavigation } from "react-router";
import { AuthCard } from "~/components/ui/panels";
import { Button, Field, FormAlert } from "~/components/ui/form";
import { fieldErrors, PASSWORD_MIN, resetPasswordSchema } from "~/lib/auth-schemas";
import { resetPassword, resetTokenIsLive } from "~/server/auth-forms.server";
import { readFormFields } from "~/server/body.server";
import { useFormCheck } from "~/components/ui/use-form-check";
import type { Route } from "./+types/reset-password";

export async function loader({ request }: Route.LoaderArgs) {
  const token = new URL(request.url).searchParams.get("token") ?? "";
  // Say at once when a link is dead (used, replaced by a newer one, or expired), not after the user typed twice.
  return { token, valid: token ? await resetTokenIsLive(token) : false };
}

export async function action({ request, context }: Route.ActionArgs) {
  const form = await readFormFields(request);
  const parsed = resetPasswordSchema.safeParse(form);
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error) }, { status: 400 });
  const result = await resetPassword({ request, context }, parsed.data.token, parsed.data.password);
  if (!result.ok) return data({ errors: { form: result.formError } }, { status: result.status });
  return result.response;
}

export default function ResetPassword({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const { errors, onSubmit } = useFormCheck(resetPasswordSchema, actionData?.errors as Record<string, string> | undefined);
  if (loaderData.token && !loaderData.valid && !actionData) {
    return (
      <AuthCard title="This reset link no longer works">
        <p className="text-ink-soft">
          It has been used, a newer link replaced it, or it expired. Request a new link; it arrives by e-mail within a minute.
        </p>
        <Link to="/forgot-password" className="mt-4 inline-block text-accent underline">Request a new link</Link>
      </AuthCard>
    );
  }
  if (!loaderData.token) {
    return (
      <AuthCard title="Reset link incomplete">
        <p className="text-ink-soft">This page needs the link from the reset e-mail. Request a new link if you no longer have it.</p>
        <Link to="/forgot-password" className="mt-4 inline-block text-accent underline">Request a new link</Link>
      </AuthCard>
    );
  }
  return (
    <AuthCard title="Choose a new password">
      <Form method="post" noValidate onSubmit={onSubmit}>
        <FormAlert>{errors.form ?? errors.token}</FormAlert>
        <input type="hidden" name="token" value={loaderData.token} />
        <Field label="New password" name="password" type="password" autoComplete="new-password" required minLength={PASSWORD_MIN} error={errors.password} hint={`At least ${PASSWORD_MIN} characters.`} />
        <Field label="Repeat new password" name="confirmPassword" type="password" autoComplete="new-password" required error={errors.confirmPassword} />
        <Button busy={busy} className="w-full">Set new password</Button>
      </Form>
    </AuthCard>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "New password · Rakeline" }];
