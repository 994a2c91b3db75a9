/**
 * Security headers on every response the app renders (pages, data requests and the API):
 * a content security policy that allows only the app's own origin (plus the configured
 * sign-on provider as a form target), no framing, a strict referrer policy and no MIME
 * sniffing. Inline styles stay allowed: the graph and plot libraries position elements
 * with style attributes. Inline scripts stay allowed for the router's hydration data.
 */
import type { MiddlewareFunction } from "react-router";

function formTargets(): string {
  const issuer = process.env.OIDC_ISSUER;
  if (!issuer) return "'self'";
  try {
    return `'self' ${new URL(issuer).origin}`;
  } catch {
    return "'self'";
  }
}

export function securityHeaders(dev = process.env.NODE_ENV === "development"): Record<string, string> {
  const csp = [
    "default-src 'self'",
    `script-src 'self' 'unsafe-inline'`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    // The development server's hot reload talks over a websocket.
    `connect-src 'self'${dev ? " ws://127.0.0.1:*" : ""}`,
    "object-src 'none'",
    "base-uri 'self'",
    `form-action ${formTargets()}`,
    "frame-ancestors 'none'",
  ].join("; ");
  return {
    "Content-Security-Policy": csp,
    "X-Frame-Options": "DENY",
    "Referrer-Policy": "strict-origin-when-cross-origin",
    "X-Content-Type-Options": "nosniff",
    "Cross-Origin-Opener-Policy": "same-origin",
    "Permissions-Policy": "camera=(), microphone=(), geolocation=()",
  };
}

/** Root middleware: adds the headers to whatever response the route produced. */
export const securityHeadersMiddleware: MiddlewareFunction<Response> = async (_args, next) => {
  const response = await next();
  for (const [name, value] of Object.entries(securityHeaders())) {
    if (!response.headers.has(name)) response.headers.set(name, value);
  }
  return response;
};
