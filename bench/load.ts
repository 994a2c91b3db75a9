/**
 * `npm run bench:load [-- seconds]`: load on a production build with a seeded database, all
 * on 127.0.0.1. Cases: library search API, the library page, a mechanism page, the rates
 * API and the simulate API, each at 50 concurrent connections for a bounded time (default
 * 10 s each; 60 s for the memory case with `-- 60`). Prints requests/s, latency percentiles,
 * errors and the server's resident memory before and after.
 * Targets (issue "Hardening"): p95 < 100 ms for pages and search, no errors, memory steady.
 */
import autocannon from "autocannon";
import knexFactory from "knex";
import { execFileSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { createCookieSessionStorage } from "react-router";
import { ensureDatabase } from "../scripts/mariadb";
import { buildApp, buildIsCurrent } from "../scripts/build-state";
import { startAppServer } from "../scripts/app-server";
import { startDevServices } from "../scripts/dev-services";
import { freePort } from "../scripts/ports";
import { knexConfigFromUrl, withDatabase } from "../db/config";
import { migrateLatest } from "../db/migrate";
import { seedDemo } from "../db/seeds/index";
import { createApiToken } from "../db/access/tokens.server";

const seconds = Number(process.argv[2] ?? process.env.LOAD_SECONDS ?? 10);
const CONNECTIONS = 50;

function rssMiB(pid: number): number {
  try {
    // Resident memory of the server process tree's main process, KiB → MiB.
    return Number(execFileSync("ps", ["-o", "rss=", "-p", String(pid)], { encoding: "utf8" }).trim()) / 1024;
  } catch {
    return NaN;
  }
}

async function main() {
  const server = await ensureDatabase("test");
  const name = `saddlebook_t_load_${randomBytes(3).toString("hex")}`;
  const admin = knexFactory(knexConfigFromUrl(server.url, { min: 0, max: 1 }));
  await admin.raw("CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci", [name]);
  const url = withDatabase(server.url, name);
  const db = knexFactory(knexConfigFromUrl(url, { min: 0, max: 2 }));
  const secret = randomBytes(32).toString("hex");
  let stopApp = async () => {};
  let stopServices = async () => {};
  try {
    await migrateLatest(db);
    await seedDemo(db);
    const author = await db("users").where({ email: "author@saddlebook.test" }).first();
    const { token } = await createApiToken(db, author.id, "load benchmark");
    const mech = await db("mechanisms").where({ owner_id: author.id }).orderBy("id").first().catch(() => null);

    if (!buildIsCurrent() && !buildApp()) throw new Error("build failed");
    const port = await freePort();
    const appUrl = `http://127.0.0.1:${port}`;
    const services = await startDevServices({ appUrl, databaseUrl: url });
    stopServices = services.stop;
    const app = await startAppServer({
      port,
      quiet: true,
      env: {
        ...services.env,
        DATABASE_URL: url,
        SESSION_SECRET: secret,
        APP_URL: appUrl,
        COMPUTE_RATES_PER_MINUTE: "100000000",
        COMPUTE_SIMULATIONS_PER_MINUTE: "100000000",
      },
    });
    stopApp = app.stop;

    // A signed session cookie for the author, made with the app's own cookie settings.
    const storage = createCookieSessionStorage({
      cookie: { name: "__saddlebook", httpOnly: true, sameSite: "lax", path: "/", secrets: [secret], maxAge: 43200 },
    });
    const session = await storage.getSession();
    session.set("userId", author.id);
    session.set("csrf", "load");
    session.set("signedInAt", Date.now());
    session.set("method", "password");
    const cookie = (await storage.commitSession(session)).split(";")[0]!;

    const bearer = { Authorization: `Bearer ${token}`, "Content-Type": "application/json" };
    const rateBody = JSON.stringify({
      steps: [
        { id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" } },
      ],
      temperatures: { values: [280, 298.15, 320, 350], unit: "K" },
    });
    const simBody = JSON.stringify({
      mechanism: {
        format: "saddlebook.mechanism",
        version: 1,
        about: { name: "load case (illustrative)" },
        species: [{ id: "A" }, { id: "I" }, { id: "P" }],
        steps: [
          { id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "I", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 85, unit: "kJ/mol", T: 298.15, standardState: "1M" } },
          { id: "s2", reactants: [{ species: "I", coef: 1 }], products: [{ species: "P", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 70, unit: "kJ/mol", T: 298.15, standardState: "1M" } },
        ],
      },
      conditions: { temperature: { value: 298.15, unit: "K" }, initial: { A: { value: 0.1, unit: "mol/L" } }, endTime: { value: 10, unit: "h" }, output: { grid: "linear", points: 100 } },
    });

    const cases: Array<{ name: string; kind: "page" | "api"; opts: { path: string; method?: string; headers?: Record<string, string>; body?: string } }> = [
      { name: "search API  GET /api/v1/steps?q=", kind: "api", opts: { path: "/api/v1/steps?q=hydride", headers: bearer } },
      { name: "library page GET /library", kind: "page", opts: { path: "/library?q=hydride", headers: { Cookie: cookie } } },
      ...(mech ? [{ name: `mechanism page GET /mechanisms/${mech.id}`, kind: "page" as const, opts: { path: `/mechanisms/${mech.id}`, headers: { Cookie: cookie } } }] : []),
      { name: "rates API   POST /api/v1/rates", kind: "api", opts: { path: "/api/v1/rates", method: "POST", headers: bearer, body: rateBody } },
      { name: "simulate API POST /api/v1/simulate", kind: "api", opts: { path: "/api/v1/simulate", method: "POST", headers: bearer, body: simBody } },
    ];

    const pid = app.child.pid!;
    const rows: string[][] = [];
    for (const c of cases) {
      // Warm up (JIT, connection pool), then measure.
      await autocannon({ url: appUrl + c.opts.path, connections: 5, duration: 1, method: c.opts.method ?? "GET", headers: c.opts.headers, body: c.opts.body });
      const before = rssMiB(pid);
      const r = await autocannon({
        url: appUrl + c.opts.path,
        connections: CONNECTIONS,
        duration: seconds,
        method: c.opts.method ?? "GET",
        headers: c.opts.headers,
        body: c.opts.body,
      });
      const after = rssMiB(pid);
      const line = {
        case: c.name,
        connections: CONNECTIONS,
        seconds,
        requestsPerSecond: Math.round(r.requests.average),
        latencyMs: { p50: r.latency.p50, p90: r.latency.p90, p97_5: r.latency.p97_5, p99: r.latency.p99, max: r.latency.max },
        total: r.requests.total,
        errors: r.errors + r.timeouts,
        non2xx: r.non2xx,
        rssMiB: { before: Math.round(before), after: Math.round(after) },
      };
      console.log(JSON.stringify(line));
      rows.push([c.name, String(line.requestsPerSecond), String(r.latency.p50), String(r.latency.p90), String(r.latency.p99), String(line.errors), String(r.non2xx), `${line.rssMiB.before}→${line.rssMiB.after}`]);
    }
    const head = ["case", "req/s", "p50 ms", "p90 ms", "p99 ms", "errors", "non-2xx", "RSS MiB"];
    const w = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
    const fmt = (r: string[]) => r.map((x, i) => (i === 0 ? x.padEnd(w[i]!) : x.padStart(w[i]!))).join("  ");
    console.log("\n" + [fmt(head), w.map((n) => "-".repeat(n)).join("  "), ...rows.map(fmt)].join("\n"));
    console.log("(autocannon reports p90 and p97.5, not p95; p90 ≤ p95 ≤ p97.5.)");
  } finally {
    await stopApp();
    await stopServices();
    await db.destroy();
    await admin.raw("DROP DATABASE IF EXISTS ??", [name]).catch(() => {});
    await admin.destroy();
    await server.stop();
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
