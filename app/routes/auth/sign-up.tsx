import { data, Form, Link, redirect, useNavigation } from "react-router";
import { AuthCard } from "~/components/ui/panels";
import { Button, Field, FormAlert } from "~/components/ui/form";
import { fieldErrors, PASSWORD_MIN, safeNext, signUpSchema } from "~/lib/auth-schemas";
import { signUp } from "~/server/auth-forms.server";
import { getSignedIn } from "~/server/session.server";
import { readFormFields } from "~/server/body.server";
import { useFormCheck } from "~/components/ui/use-form-check";
import type { Route } from "./+types/sign-up";

export async function loader({ request }: Route.LoaderArgs) {
  const next = safeNext(new URL(request.url).searchParams.get("next"));
  if (await getSignedIn(request)) throw redirect(next ?? "/");
  return { next: next ?? "" };
}

export async function action({ request, context }: Route.ActionArgs) {
  const form = await readFormFields(request);
  const parsed = signUpSchema.safeParse(form);
  if (!parsed.success) {
    return data({ errors: fieldErrors(parsed.error), values: { name: String(form.name ?? ""), email: String(form.email ?? "") }, sentTo: null }, { status: 400 });
  }
  const result = await signUp({ request, context }, parsed.data);
  if (!result.ok) {
    return data({ errors: { form: result.formError }, values: { name: parsed.data.name, email: parsed.data.email }, sentTo: null }, { status: result.status });
  }
  // Same answer whether or not the address already has an account: nothing is revealed here.
  return { errors: {}, values: { name: parsed.data.name, email: parsed.data.email }, sentTo: parsed.data.email };
}

export default function SignUp({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const { errors, onSubmit } = useFormCheck(signUpSchema, actionData?.errors as Record<string, string> | undefined);
  const next = loaderData.next;
  if (actionData?.sentTo) {
    return (
      <AuthCard title="Check your e-mail">
        <p className="text-ink-soft">
          We sent a confirmation link to <strong className="text-ink">{actionData.sentTo}</strong>. Open it to confirm the address;
          it signs you in and takes you on. The link is valid for 24 hours.
        </p>
        <p className="mt-3 text-sm text-ink-faint">Nothing arrived after a few minutes? Check the spam folder, or sign in to get a new link.</p>
      </AuthCard>
    );
  }
  const signInHref = next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in";
  return (
    <AuthCard title="Create your Rakeline account" footer={<>Already have an account? <Link className="text-accent underline" to={signInHref}>Sign in</Link></>}>
      <Form method="post" noValidate onSubmit={onSubmit}>
        <FormAlert>{errors.form}</FormAlert>
        <input type="hidden" name="next" value={next} />
        <Field label="Name" name="name" autoComplete="name" required defaultValue={actionData?.values.name} error={errors.name} />
        <Field label="E-mail" name="email" type="email" autoComplete="email" required defaultValue={actionData?.values.email} error={errors.email} />
        <Field label="Password" name="password" type="password" autoComplete="new-password" required minLength={PASSWORD_MIN} error={errors.password} hint={`At least ${PASSWORD_MIN} characters.`} />
        <Field label="Repeat password" name="confirmPassword" type="password" autoComplete="new-password" required error={errors.confirmPassword} />
        <Button busy={busy} className="w-full">Create account</Button>
      </Form>
    </AuthCard>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Create an account · Rakeline" }];
