import { useEffect } from "react";
import { isRouteErrorResponse, Links, Meta, Outlet, Scripts, ScrollRestoration, useRouteLoaderData } from "react-router";
import type { Route } from "./+types/root";
import "./app.css";
import { getOptionalUser } from "./auth/guards.server";
import { AppShell } from "./components/AppShell";
import { nonceContext, services } from "./context";
import { retryAfterHeaders } from "./auth/rate-limit.server";
import { DEFAULT_NAMING } from "./music/naming";
import { schoolNaming } from "./school/naming.server";

export const meta: Route.MetaFunction = () => [
  { title: "Fretcall — read the note, find the fret" },
  { name: "description", content: "Live reading rounds and practice for group guitar classes." },
];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await getOptionalUser(request, context);
  return {
    nonce: context.get(nonceContext),
    user: user ? { displayName: user.displayName, role: user.role } : null,
    // Server-rendered note names follow the school's naming; a device's own choice applies after hydration.
    naming: user ? await schoolNaming(services(context).db, user.orgId) : DEFAULT_NAMING,
    showOutbox: services(context).env.mailCapture,
  };
}

export function Layout({ children }: { children: React.ReactNode }) {
  const data = useRouteLoaderData<typeof loader>("root");
  // The layout's effect runs after every child's: a signal that the whole page is hydrated, for tests and bench/pageload.ts.
  useEffect(() => {
    document.documentElement.dataset.hydrated = "";
  }, []);
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1, viewport-fit=cover" />
        <meta name="theme-color" content="#3b1f1a" />
        <link rel="icon" href="/favicon.svg" type="image/svg+xml" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-dvh bg-paper text-ink antialiased">
        {children}
        <ScrollRestoration nonce={data?.nonce} />
        <Scripts nonce={data?.nonce} />
      </body>
    </html>
  );
}

export default function App({ loaderData }: Route.ComponentProps) {
  return (
    <AppShell user={loaderData.user} showOutbox={loaderData.showOutbox}>
      <Outlet />
    </AppShell>
  );
}

// A loader's thrown 429 (the pad's room-code look-up) reaches this boundary with its Retry-After.
export const headers: Route.HeadersFunction = retryAfterHeaders;

/** The `error` of a route's JSON answer; a refusal made before the app (413) arrives as its text. */
function errorSentence(data: unknown): string | undefined {
  if (typeof data !== "string") return (data as { error?: string } | undefined)?.error;
  try {
    return (JSON.parse(data) as { error?: string }).error;
  } catch {
    return undefined;
  }
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let title = "Something went wrong";
  let detail = "Please try again. If it keeps happening, tell your teacher or the school's admin.";
  if (isRouteErrorResponse(error)) {
    title = error.status === 404 ? "Page not found" : `${error.status} ${error.statusText || "Error"}`;
    const message = errorSentence(error.data);
    if (error.status === 404) detail = "That page doesn't exist. Check the address, or go back to the start.";
    else if (message) detail = message;
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
  }
  return (
    <AppShell user={null} showOutbox={false}>
      <section className="mx-auto max-w-xl py-16 text-center">
        <h1 className="font-display text-3xl font-semibold">{title}</h1>
        <p className="mt-4 text-ink-soft">{detail}</p>
        <a href="/" className="mt-8 inline-block rounded-full bg-ink px-6 py-3 text-paper">
          Back to the start
        </a>
      </section>
    </AppShell>
  );
}
