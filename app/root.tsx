import {
  data,
  isRouteErrorResponse,
  Links,
  Meta,
  Outlet,
  Scripts,
  ScrollRestoration,
  useRouteLoaderData,
} from "react-router";
import type { Route } from "./+types/root";
import "@fontsource/noto-sans/400.css";
import "@fontsource/noto-sans/500.css";
import "@fontsource/noto-sans/600.css";
import "@fontsource/noto-sans/700.css";
import "./app.css";
import { securityHeadersMiddleware } from "./security/headers.server";
import { apiOriginMiddleware } from "./security/api-origin.server";
import { apiBodyTypeMiddleware } from "./api/body-type.server";
import { pageFormMiddleware } from "./security/form-body.server";
import { apiErrorsMiddleware } from "./api/api-errors.server";
import { requestScopeMiddleware } from "./auth/request-scope.server";
import { AppShell } from "./components/AppShell";
import { getOptionalUser } from "./auth/current-user.server";
import { ensureCsrfToken } from "./auth/csrf.server";
import { can, mayReviewProposals } from "./auth/policy.server";
import { getDb } from "../db/client.server";
import { countWaitingProposals } from "../db/access/review-queue.server";
import { mailboxEnabled } from "./mail/mailbox.server";

export const middleware: Route.MiddlewareFunction[] = [securityHeadersMiddleware, apiErrorsMiddleware, apiOriginMiddleware, apiBodyTypeMiddleware, pageFormMiddleware, requestScopeMiddleware];

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getOptionalUser(request);
  const { token: csrf, setCookie } = await ensureCsrfToken(request);
  const admin = !!user && can(user, { do: "user.manage" });
  // Curators (whoever may review, per the policy) see the review queue, with its size, in the navigation.
  const reviewQueue = user && mayReviewProposals(user) ? await countWaitingProposals(getDb()) : undefined;
  const shellUser = user ? { id: user.id, email: user.email, name: user.name, role: user.role, admin, mailbox: admin && mailboxEnabled(), reviewQueue } : null;
  return data({ user: shellUser, csrf }, setCookie ? { headers: { "Set-Cookie": setCookie } } : undefined);
}

export function Layout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body>
        {children}
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

export default function App({ loaderData }: Route.ComponentProps) {
  return (
    <AppShell user={loaderData.user} csrf={loaderData.csrf}>
      <Outlet />
    </AppShell>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const data = useRouteLoaderData<typeof loader>("root");
  let title = "Something went wrong";
  let detail = "The page could not be shown. Nothing you saved has been lost; try again, or go back.";
  if (isRouteErrorResponse(error)) {
    if (error.status === 404) {
      title = "Page not found";
      detail = "There is nothing at this address. It may have been moved, or the link may be mistyped.";
    } else if (error.status === 403) {
      title = "Not allowed";
      detail = typeof error.data === "string" && error.data ? error.data : "Your role does not allow this.";
    } else {
      title = `${error.status} ${error.statusText}`;
      detail = typeof error.data === "string" && error.data ? error.data : detail;
    }
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
  }
  return (
    <AppShell user={data?.user ?? null} csrf={data?.csrf}>
      <div className="panel mx-auto mt-10 max-w-xl">
        <h1 className="text-xl font-semibold text-ink-900">{title}</h1>
        <p className="mt-2 text-ink-700">{detail}</p>
        <a href="/" className="btn-quiet mt-4">
          Back to the start page
        </a>
        {import.meta.env.DEV && error instanceof Error && error.stack && (
          <pre className="mt-4 overflow-x-auto rounded bg-ink-50 p-3 text-xs">{error.stack}</pre>
        )}
      </div>
    </AppShell>
  );
}
