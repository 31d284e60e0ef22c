import { isRouteErrorResponse, Link } from "react-router";

/** One rendering for expected failures (401/403/404/400…) and unexpected ones; stack only in development. */
export function ErrorView({ error }: { error: unknown }) {
  let title = "Something went wrong";
  let detail = "An unexpected error occurred. Try again; if it keeps happening, tell whoever runs this Rakeline.";
  let stack: string | undefined;
  if (isRouteErrorResponse(error)) {
    const message = typeof error.data === "string" ? error.data : (error.data as { error?: string } | null)?.error;
    title = { 400: "That did not work", 401: "Sign in to continue", 403: "Not allowed", 404: "Not found", 413: "Too large", 415: "Not a form" }[error.status] ?? `Error ${error.status}`;
    detail = message || (error.status === 404 ? "There is nothing at this address." : error.statusText || detail);
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
    stack = error.stack;
  }
  return (
    <div className="mx-auto max-w-3xl px-4 py-10">
      <h1 className="text-2xl font-semibold">{title}</h1>
      <p className="mt-2 text-ink-soft">{detail}</p>
      <p className="mt-4 text-sm">
        <Link to="/" className="text-accent underline">
          Back to the start page
        </Link>
      </p>
      {stack && <pre className="num mt-4 overflow-x-auto bg-rule-soft p-4 text-xs">{stack}</pre>}
    </div>
  );
}
