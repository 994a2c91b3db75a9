/**
 * What a client sends never stops a worker of the production server (scripts/request-bridge.mjs):
 * chunked bodies over the JSON limit, bodies over the server-wide limit (declared or streamed),
 * a Host header that makes no URL and a client that hangs up mid-upload each get their answer
 * (413 / 400 in the API's JSON error shape) and the same worker keeps serving pages.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { connect } from "node:net";
import { request as httpRequest } from "node:http";
import { freshDatabase, type TestDatabase } from "../support/db";
import { descendantsOf } from "../support/processes";
import { seedDemo } from "../../db/seeds/index";
import { createApiToken } from "../../db/access/tokens.server";
import { startAppServer, type AppServer } from "../../scripts/app-server";
import { freePort } from "../../scripts/ports";

const SERVER_LIMIT = 2 * 1024 * 1024;

interface Answer {
  status: number;
  type: string;
  body: string;
}

/** POSTs `total` bytes in 64 KiB chunks with no Content-Length (chunked transfer encoding). */
function postChunked(url: string, headers: Record<string, string>, total: number): Promise<Answer> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(url, { method: "POST", agent: false, headers }, (res) => {
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (c) => (body += c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, type: String(res.headers["content-type"] ?? ""), body }));
    });
    req.on("error", reject);
    const chunk = Buffer.alloc(64 * 1024, 0x20); // JSON white space
    let sent = 0;
    const pump = () => {
      while (sent < total) {
        sent += chunk.length;
        if (!req.write(chunk)) return void req.once("drain", pump);
      }
      req.end();
    };
    pump();
  });
}

/** A raw HTTP/1.1 request text, and the status line of the answer. */
function rawRequest(port: number, text: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const s = connect(port, "127.0.0.1", () => s.write(text));
    let got = "";
    s.on("data", (d) => (got += d.toString("latin1")));
    s.on("end", () => resolve(got));
    s.on("close", () => resolve(got));
    s.on("error", reject);
    setTimeout(() => s.destroy(), 5000).unref();
  });
}

// Needs the production build, which npm test makes before the suites run.
describe.skipIf(!process.env.APP_URL)("request bodies and the production server's workers", () => {
  let t: TestDatabase;
  let app: AppServer | undefined;
  let port: number;
  let viewerToken: string;
  let before: number[] = [];

  beforeAll(async () => {
    t = await freshDatabase();
    await seedDemo(t.db);
    const viewer = await t.db("users").where({ email: "viewer@saddlebook.test" }).first("id");
    viewerToken = (await createApiToken(t.db, viewer.id, "body limit test")).token;
    port = await freePort();
    app = await startAppServer({
      port,
      quiet: true,
      env: { DATABASE_URL: t.url, SESSION_SECRET: "body-limit-test-secret-body-limit", WEB_CONCURRENCY: "1", MAX_REQUEST_BODY_BYTES: String(SERVER_LIMIT) },
    });
    const deadline = Date.now() + 20_000;
    while (descendantsOf(app.child.pid!).length < 1 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 200));
    before = descendantsOf(app.child.pid!);
  }, 180_000);

  afterAll(async () => {
    await app?.stop();
    await t?.drop();
  });

  it("answers 20 chunked JSON bodies over the 1 MB limit with 413 in the JSON shape, then serves a page from the same worker", async () => {
    const headers = { Authorization: `Bearer ${viewerToken}`, "Content-Type": "application/json" };
    for (let i = 0; i < 20; i++) {
      const a = await postChunked(app!.url + "/api/v1/rates", headers, 1_600_000);
      expect(a.status).toBe(413);
      expect(a.type).toMatch(/application\/json/);
      expect(JSON.parse(a.body).error.code).toBe("body_too_large");
    }
    const page = await fetch(app!.url + "/sign-in");
    expect(page.status).toBe(200);
    expect(descendantsOf(app!.child.pid!)).toEqual(before);
  }, 120_000);

  it("answers a streamed body over the server-wide limit with 413 on a page form and on the API", async () => {
    for (const path of ["/sign-in", "/api/v1/simulate", "/register"]) {
      const type = path.startsWith("/api/") ? "application/json" : "application/x-www-form-urlencoded";
      const a = await postChunked(app!.url + path, { Authorization: `Bearer ${viewerToken}`, "Content-Type": type }, SERVER_LIMIT + 256 * 1024);
      expect(a.status, path).toBe(413);
      // The simulate API's own 1 MB limit may answer first; the page forms reach the server's.
      expect(JSON.parse(a.body).error.message).toMatch(path.startsWith("/api/") ? /larger than the/ : /larger than the server's limit/);
    }
    expect((await fetch(app!.url + "/api/v1/health")).status).toBe(200);
    expect(descendantsOf(app!.child.pid!)).toEqual(before);
  }, 60_000);

  it("refuses a declared Content-Length over the limit before reading the body", async () => {
    const got = await rawRequest(port, `POST /sign-in HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Length: ${SERVER_LIMIT + 1}\r\nContent-Type: text/plain\r\n\r\nx`);
    expect(got).toMatch(/^HTTP\/1\.1 413 /);
    expect(got).toMatch(/"code":"body_too_large"/);
  });

  it("answers a Host header that makes no address with 400, and survives clients that hang up mid-upload", async () => {
    const got = await rawRequest(port, "GET / HTTP/1.1\r\nHost: a b[\r\nConnection: close\r\n\r\n");
    expect(got).toMatch(/^HTTP\/1\.1 400 /);
    for (let i = 0; i < 10; i++) {
      await new Promise<void>((resolve) => {
        const s = connect(port, "127.0.0.1", () => {
          s.write(`POST /api/v1/rates HTTP/1.1\r\nHost: 127.0.0.1\r\nAuthorization: Bearer ${viewerToken}\r\nContent-Type: application/json\r\nTransfer-Encoding: chunked\r\n\r\n10000\r\n`);
          s.write(Buffer.alloc(0x8000, 0x20));
          setTimeout(() => (s.destroy(), resolve()), 50);
        });
        s.on("error", () => resolve());
      });
    }
    const page = await fetch(app!.url + "/sign-in");
    expect(page.status).toBe(200);
    expect(descendantsOf(app!.child.pid!)).toEqual(before);
  }, 60_000);
});
