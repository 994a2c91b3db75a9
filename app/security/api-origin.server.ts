/**
 * Cross-site request forgery on the REST API. A browser sends the session cookie with a request
 * that another page starts (SameSite=Lax still lets a page of the same site on another port
 * through), so an API write authenticated by the cookie must come from Saddlebook's own pages:
 * its Origin (or, without one, its Sec-Fetch-Site) must be this app's. Requests with an API
 * token (Authorization header) carry no ambient credential and are not checked; neither are
 * reads, nor requests without the session cookie (they act as nobody).
 */
import type { MiddlewareFunction } from "react-router";
import { apiError } from "~/api/errors.server";
import { SESSION_COOKIE } from "~/auth/session.server";

const WRITES = new Set(["POST", "PUT", "PATCH", "DELETE"]);

export const CROSS_ORIGIN_MESSAGE =
  "This request came from another site's page, so it was refused: API changes signed in by the session cookie must come from Saddlebook's own pages. Scripts and other programs should send an API token (Authorization: Bearer <token>).";

function originOf(url: string | undefined): string | null {
  if (!url) return null;
  try {
    return new URL(url).origin;
  } catch {
    return null;
  }
}

function sendsSessionCookie(request: Request): boolean {
  const cookie = request.headers.get("Cookie");
  return !!cookie && cookie.split(";").some((c) => c.trim().startsWith(`${SESSION_COOKIE}=`));
}

/**
 * Whether the browser says this request comes from the app's own origin: the origin the
 * request was made to, or APP_URL's (behind a proxy that ends https). Without Origin, the
 * Sec-Fetch-Site header decides; a client that sends neither is not a browser page.
 */
export function fromOwnOrigin(request: Request): boolean {
  const origin = request.headers.get("Origin");
  if (origin !== null) {
    if (origin === "null") return false;
    const own = new URL(request.url);
    const allowed = [own.origin, originOf(process.env.APP_URL)];
    // The same host and port reached over https through a proxy that ends TLS.
    if (own.protocol === "http:") allowed.push(`https://${own.host}`);
    return allowed.includes(origin.toLowerCase());
  }
  const site = request.headers.get("Sec-Fetch-Site");
  return site === null || site === "same-origin" || site === "none";
}

/** Root middleware: 403 JSON for a cookie-authenticated API write from another origin. */
export const apiOriginMiddleware: MiddlewareFunction<Response> = async ({ request }, next) => {
  if (
    WRITES.has(request.method) &&
    new URL(request.url).pathname.startsWith("/api/") &&
    !request.headers.has("Authorization") &&
    sendsSessionCookie(request) &&
    !fromOwnOrigin(request)
  ) {
    return apiError(403, "cross_origin", CROSS_ORIGIN_MESSAGE);
  }
  return next();
};
