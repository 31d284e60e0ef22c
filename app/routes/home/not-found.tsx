import { data, Link } from "react-router";
import type { Route } from "./+types/not-found";

export function loader() {
  throw data("There is nothing at this address.", { status: 404 });
}

export default function NotFound() {
  return (
    <main id="main" tabIndex={-1} className="mx-auto max-w-3xl px-4 py-10">
      <h1 className="text-2xl font-semibold">Not found</h1>
      <p className="mt-2 text-ink-soft">There is nothing at this address.</p>
      <Link to="/" className="mt-4 inline-block text-accent underline">
        Back to the start page
      </Link>
    </main>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Not found · Rakeline" }];
