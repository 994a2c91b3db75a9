// Every response of the served app carries the security headers: pages, the API, 404s.
import { describe, expect, it } from "vitest";

const expected: Array<[string, RegExp]> = [
  ["content-security-policy", /default-src 'self'.*frame-ancestors 'none'/],
  ["x-frame-options", /^DENY$/],
  ["referrer-policy", /^strict-origin-when-cross-origin$/],
  ["x-content-type-options", /^nosniff$/],
];

describe.skipIf(!process.env.APP_URL)("security headers", () => {
  for (const path of ["/", "/api/v1/health", "/api/v1/no-such-endpoint", "/no-such-page"]) {
    it(`are set on ${path}`, async () => {
      const r = await fetch(process.env.APP_URL + path);
      for (const [name, pattern] of expected) expect(r.headers.get(name), `${name} on ${path}`).toMatch(pattern);
      const csp = r.headers.get("content-security-policy") ?? "";
      // Only the app's own origin serves scripts, fonts and data.
      for (const directive of ["script-src", "font-src", "connect-src"]) {
        const value = csp.split(";").find((d) => d.trim().startsWith(directive)) ?? "";
        expect(value, directive).not.toMatch(/https?:\/\/(?!127\.0\.0\.1)/);
      }
    });
  }
});
