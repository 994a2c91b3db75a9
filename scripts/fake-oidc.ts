/**
 * The local OpenID Connect provider for development and tests (oauth2-mock-server on a
 * free 127.0.0.1 port). Before it issues a code it shows a small "who are you?" page
 * listing the demo identities (one per role) and a form for any other address, so
 * every role can be tried. A sign-in link may skip the page with `login_hint=<e-mail>`.
 * The ID token then carries that person's sub, e-mail and name.
 */
import http from "node:http";
import { createHash } from "node:crypto";
import { OAuth2Issuer, OAuth2Service } from "oauth2-mock-server";
import { DEMO_USERS } from "../db/seeds/demo-identities";

export interface FakeIdentity {
  email: string;
  name: string;
  note: string;
}

/** Demo identities offered on the chooser page, plus one person with no account yet. */
export const FAKE_IDENTITIES: FakeIdentity[] = [
  ...DEMO_USERS.map((u) => ({ email: u.email, name: u.name, note: `demo ${u.role}` })),
  { email: "newcomer@saddlebook.test", name: "Nell Okafor", note: "no account yet: first sign-in creates one" },
];

export interface FakeOidc {
  issuer: string;
  clientId: string;
  clientSecret: string;
  stop(): Promise<void>;
}

function esc(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

function subjectFor(email: string): string {
  return "local-" + createHash("sha256").update(email).digest("hex").slice(0, 16);
}

function chooserPage(query: URLSearchParams, problem?: string): string {
  const hidden = [...query.entries()]
    .filter(([k]) => k !== "login_hint" && k !== "name")
    .map(([k, v]) => `<input type="hidden" name="${esc(k)}" value="${esc(v)}">`)
    .join("");
  const buttons = FAKE_IDENTITIES.map(
    (i) =>
      `<button type="submit" name="login_hint" value="${esc(i.email)}" class="who"><strong>${esc(i.name)}</strong><span>${esc(i.email)} · ${esc(i.note)}</span></button>`,
  ).join("");
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Local sign-in provider</title>
<meta name="viewport" content="width=device-width, initial-scale=1">
<style>
body{font-family:system-ui,sans-serif;background:#eef1f4;color:#223040;margin:0}
main{max-width:520px;margin:40px auto;background:#fff;border:1px solid #cfd8e1;border-radius:8px;padding:24px}
h1{font-size:20px;margin:0 0 4px} p{color:#55667a;font-size:14px}
.who{display:block;width:100%;text-align:left;margin:8px 0;padding:10px 12px;border:1px solid #cfd8e1;border-radius:6px;background:#f8fafb;cursor:pointer;font:inherit}
.who:hover{border-color:#b8652f;background:#fdf6f0} .who span{display:block;font-size:13px;color:#55667a}
label{display:block;font-size:13px;margin-top:8px} input[type=email],input[type=text]{width:100%;box-sizing:border-box;padding:6px;border:1px solid #cfd8e1;border-radius:4px}
.go{margin-top:10px;padding:8px 14px;background:#223040;color:#fff;border:0;border-radius:6px;cursor:pointer}
.problem{color:#9b2c2c}
</style></head><body><main>
<h1>Local sign-in provider</h1>
<p>Development and test stand-in for your organisation's single sign-on. Choose who signs in; no password is asked.</p>
${problem ? `<p class="problem">${esc(problem)}</p>` : ""}
<form method="get" action="/authorize">${hidden}${buttons}</form>
<form method="get" action="/authorize">${hidden}
<p>Or someone else:</p>
<label>E-mail <input type="email" name="login_hint" required></label>
<label>Name <input type="text" name="name"></label>
<button class="go" type="submit">Sign in as this person</button>
</form></main></body></html>`;
}

export async function startFakeOidc(opts: { port: number; clientId?: string; clientSecret?: string }): Promise<FakeOidc> {
  const issuer = new OAuth2Issuer();
  issuer.url = `http://127.0.0.1:${opts.port}`;
  await issuer.keys.generate("RS256");
  const service = new OAuth2Service(issuer);
  // Which identity each issued code belongs to (cleared when the code is exchanged).
  const byCode = new Map<string, FakeIdentity>();

  service.on("beforeAuthorizeRedirect", (redirect: { url: URL }, req: http.IncomingMessage & { query?: Record<string, unknown> }) => {
    const url = new URL(req.url ?? "/", issuer.url);
    const email = (url.searchParams.get("login_hint") ?? "").trim().toLowerCase();
    const known = FAKE_IDENTITIES.find((i) => i.email === email);
    const code = redirect.url.searchParams.get("code");
    if (code) byCode.set(code, known ?? { email, name: (url.searchParams.get("name") ?? "").trim() || email.split("@")[0], note: "" });
  });
  service.on("beforeTokenSigning", (token: { payload: Record<string, unknown> }, req: { body?: Record<string, string> }) => {
    const code = req.body?.code;
    const who = code ? byCode.get(code) : undefined;
    if (!who) return;
    token.payload.sub = subjectFor(who.email);
    token.payload.email = who.email;
    token.payload.email_verified = true;
    token.payload.name = who.name;
  });
  service.on("beforeResponse", (_res: unknown, req: { body?: Record<string, string> }) => {
    const code = req.body?.code;
    if (code) byCode.delete(code);
  });

  const handler = service.requestHandler;
  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? "/", issuer.url);
    if (url.pathname === "/favicon.ico") {
      res.writeHead(204).end();
      return;
    }
    if (url.pathname === "/authorize" && req.method === "GET") {
      const hint = (url.searchParams.get("login_hint") ?? "").trim();
      if (!hint || !/^[^@\s]+@[^@\s]+$/.test(hint)) {
        res.writeHead(200, { "Content-Type": "text/html; charset=utf-8", "Cache-Control": "no-store" });
        res.end(chooserPage(url.searchParams, hint ? "Enter an e-mail address such as someone@example.test." : undefined));
        return;
      }
    }
    handler(req, res);
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  return {
    issuer: issuer.url!,
    clientId: opts.clientId ?? "saddlebook-local",
    clientSecret: opts.clientSecret ?? "saddlebook-local-secret",
    stop: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections?.();
        server.close(() => resolve());
      }),
  };
}
