import { data, Form, Link, redirect, useNavigation } from "react-router";
import { AuthCard } from "~/components/ui/panels";
import { Button, Field, FormAlert } from "~/components/ui/form";
import { fieldErrors, safeNext, signInSchema } from "~/lib/auth-schemas";
import { signIn } from "~/server/auth-forms.server";
import { getSignedIn } from "~/server/session.server";
import { readFormFields } from "~/server/body.server";
import { useFormCheck } from "~/components/ui/use-form-check";
import type { Route } from "./+types/sign-in";

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const next = safeNext(url.searchParams.get("next"));
  if (await getSignedIn(request)) throw redirect(next ?? "/");
  return { next: next ?? "", reset: url.searchParams.get("reset") === "1" };
}

export async function action({ request, context }: Route.ActionArgs) {
  const form = await readFormFields(request);
  const parsed = signInSchema.safeParse(form);
  const email = String(form.email ?? "");
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error), email }, { status: 400 });
  const result = await signIn({ request, context }, parsed.data, parsed.data.next ?? "/");
  if (!result.ok) return data({ errors: { form: result.formError }, email }, { status: result.status });
  return result.response;
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const { errors, onSubmit } = useFormCheck(signInSchema, actionData?.errors as Record<string, string> | undefined);
  const next = loaderData.next;
  const signUpHref = next ? `/sign-up?next=${encodeURIComponent(next)}` : "/sign-up";
  return (
    <AuthCard title="Sign in" footer={<>New to Rakeline? <Link className="text-accent underline" to={signUpHref}>Create an account</Link></>}>
      <Form method="post" noValidate onSubmit={onSubmit}>
        {loaderData.reset && <FormAlert tone="info">Your password has been changed. Sign in with the new one.</FormAlert>}
        <FormAlert>{errors.form}</FormAlert>
        <input type="hidden" name="next" value={next} />
        <Field label="E-mail" name="email" type="email" autoComplete="email" required defaultValue={actionData?.email} error={errors.email} />
        <Field label="Password" name="password" type="password" autoComplete="current-password" required error={errors.password} />
        <Button busy={busy} className="w-full">Sign in</Button>
        <p className="mt-3 text-sm">
          <Link className="text-accent underline" to="/forgot-password">Forgot your password?</Link>
        </p>
      </Form>
    </AuthCard>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Rakeline" }];
