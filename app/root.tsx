import { Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import { ErrorView } from "./components/ui/error-view";
import { useNonce } from "./components/ui/nonce";
import type { Route } from "./+types/root";
import "./app.css";

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export function Layout({ children }: { children: React.ReactNode }) {
  const nonce = useNonce();
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <meta name="color-scheme" content="light" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen antialiased">
        <a href="#main" className="sr-only z-50 rounded bg-panel px-3 py-2 text-sm text-accent underline focus:not-sr-only focus:absolute focus:top-2 focus:left-2">
          Skip to the page's content
        </a>
        {children}
        <ScrollRestoration nonce={nonce} />
        <Scripts nonce={nonce} />
      </body>
    </html>
  );
}

export default function App() {
  return <Outlet />;
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Rakeline" }];
