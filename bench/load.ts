/**
 * `npm run bench:load [-- seconds [memorySeconds]]`: load on a production build (scripts/serve.ts,
 * its default worker count) with a seeded database, all on 127.0.0.1. Cases: library search
 * API, the library page, a mechanism page, the rates API and the simulate API, each at 50
 * concurrent connections for a bounded time (default 10 s each). Then a memory run: all five
 * requests in turn on 50 connections for `memorySeconds` (default 60), sampling the resident
 * memory of the server's processes every 5 s. Between the two, a heavy-rates case: large rates
 * requests on 10 connections beside library-page loads on 40, to show the pages stay responsive.
 * Prints requests/s, latency percentiles (p95 from every response time), errors, the server's
 * CPU time per request (all its processes, from /proc) and memory.
 * Targets (issue "Hardening"): p95 < 100 ms for pages and search, no errors, memory steady.
 */
import autocannon from "autocannon";
import knexFactory from "knex";
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { randomBytes } from "node:crypto";
import { availableParallelism } from "node:os";
import { ensureDatabase } from "../scripts/mariadb";
import { buildApp, buildIsCurrent } from "../scripts/build-state";
import { startAppServer } from "../scripts/app-server";
import { startDevServices } from "../scripts/dev-services";
import { freePort } from "../scripts/ports";
import { knexConfigFromUrl, withDatabase } from "../db/config";
import { migrateLatest } from "../db/migrate";
import { seedDemo } from "../db/seeds/index";
import { createApiToken } from "../db/access/tokens.server";
import { sessionStorage } from "../app/auth/session.server";

const seconds = Number(process.argv[2] ?? process.env.LOAD_SECONDS ?? 10);
const memorySeconds = Number(process.argv[3] ?? process.env.LOAD_MEMORY_SECONDS ?? 60);
const CONNECTIONS = 50;

/** A process and all its descendants (the supervisor and its workers), from `ps`: pid and resident KiB. */
function processTree(pid: number): Array<{ pid: number; rssKiB: number }> {
  const rows = execFileSync("ps", ["-e", "-o", "pid=,ppid=,rss="], { encoding: "utf8" })
    .trim()
    .split("\n")
    .map((l) => l.trim().split(/\s+/).map(Number) as [number, number, number]);
  const inTree = new Set([pid]);
  let grew = true;
  while (grew) {
    grew = false;
    for (const [p, pp] of rows) if (inTree.has(pp) && !inTree.has(p)) (inTree.add(p), (grew = true));
  }
  return rows.filter(([p]) => inTree.has(p)).map(([p, , rss]) => ({ pid: p, rssKiB: rss }));
}

/** Resident memory (MiB) of the server's processes. */
function treeRssMiB(pid: number): number {
  try {
    return processTree(pid).reduce((a, x) => a + x.rssKiB, 0) / 1024;
  } catch {
    return NaN;
  }
}

/** CPU time (ms, user + system) used so far by the server's processes, per pid, from /proc/<pid>/stat (Linux). */
function treeCpuMs(pid: number): Map<number, number> {
  const out = new Map<number, number>();
  try {
    for (const { pid: p } of processTree(pid)) {
      const stat = readFileSync(`/proc/${p}/stat`, "utf8");
      const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" "); // fields from the 3rd on
      out.set(p, ((Number(fields[11]) + Number(fields[12])) * 1000) / CLOCK_TICKS_PER_S); // utime, stime
    }
  } catch {
    /* not Linux, or a process ended: leave it out */
  }
  return out;
}
/** USER_HZ of Linux's /proc accounting (100 on every common configuration). */
const CLOCK_TICKS_PER_S = 100;

/** Server CPU ms between two `treeCpuMs` readings (processes present in both). */
function cpuBetween(a: Map<number, number>, b: Map<number, number>): number {
  let ms = 0;
  for (const [p, t] of b) if (a.has(p)) ms += t - a.get(p)!;
  return ms;
}

function percentile(sorted: number[], q: number): number {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)]!;
}

interface LoadRequest {
  path: string;
  method?: string;
  headers?: Record<string, string>;
  body?: string;
}

/** One autocannon run that also keeps every response time (ms), for exact percentiles. */
async function hammer(url: string, opts: { connections: number; duration: number; requests: LoadRequest[] }) {
  const times: number[] = [];
  // Without a callback autocannon returns its run tracker: an event emitter that is also a promise.
  const inst = autocannon({ url, connections: opts.connections, duration: opts.duration, requests: opts.requests }) as unknown as Promise<Awaited<ReturnType<typeof autocannon>>> & {
    on(event: "response", fn: (client: unknown, status: number, bytes: number, ms: number) => void): void;
  };
  inst.on("response", (_client: unknown, _status: number, _bytes: number, ms: number) => times.push(ms));
  const r = await inst;
  times.sort((a, b) => a - b);
  const ms = (x: number) => Math.round(x * 10) / 10;
  return { r, p50: ms(percentile(times, 0.5)), p95: ms(percentile(times, 0.95)), p99: ms(percentile(times, 0.99)), max: ms(times[times.length - 1] ?? NaN) };
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
    const services = await startDevServices({ appUrl, databaseUrl: url, standins: true });
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

    // A signed session cookie for the author, made by the app's own session module.
    process.env.SESSION_SECRET = secret;
    const storage = sessionStorage();
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
      { name: "search API  GET /api/v1/steps?q=", kind: "api", opts: { path: "/api/v1/steps?q=anhydride", headers: bearer } },
      { name: "library page GET /library", kind: "page", opts: { path: "/library?q=anhydride", headers: { Cookie: cookie } } },
      ...(mech ? [{ name: `mechanism page GET /mechanisms/${mech.id}`, kind: "page" as const, opts: { path: `/mechanisms/${mech.id}`, headers: { Cookie: cookie } } }] : []),
      { name: "rates API   POST /api/v1/rates", kind: "api", opts: { path: "/api/v1/rates", method: "POST", headers: bearer, body: rateBody } },
      { name: "simulate API POST /api/v1/simulate", kind: "api", opts: { path: "/api/v1/simulate", method: "POST", headers: bearer, body: simBody } },
    ];

    const pid = app.child.pid!;
    const rows: string[][] = [];
    for (const c of cases) {
      const req: LoadRequest = { path: c.opts.path, method: c.opts.method ?? "GET", headers: c.opts.headers, body: c.opts.body };
      // Warm up (JIT, connection pools), then measure.
      await hammer(appUrl, { connections: 5, duration: 1, requests: [req] });
      const before = treeRssMiB(pid);
      const cpuBefore = treeCpuMs(pid);
      const { r, p50, p95, p99, max } = await hammer(appUrl, { connections: CONNECTIONS, duration: seconds, requests: [req] });
      const cpuMsPerRequest = r.requests.total > 0 ? Number((cpuBetween(cpuBefore, treeCpuMs(pid)) / r.requests.total).toFixed(2)) : NaN;
      const after = treeRssMiB(pid);
      const line = {
        case: c.name,
        kind: c.kind,
        connections: CONNECTIONS,
        seconds,
        requestsPerSecond: Math.round(r.requests.average),
        latencyMs: { p50, p95, p99, max },
        total: r.requests.total,
        errors: r.errors + r.timeouts,
        non2xx: r.non2xx,
        rssMiB: { before: Math.round(before), after: Math.round(after) },
        serverCpuMsPerRequest: cpuMsPerRequest,
        p95TargetMet: c.kind === "page" || c.name.startsWith("search") ? p95 < 100 : undefined,
      };
      console.log(JSON.stringify(line));
      rows.push([c.name, String(line.requestsPerSecond), String(p50), String(p95), String(p99), String(line.errors), String(r.non2xx), String(cpuMsPerRequest), `${line.rssMiB.before}→${line.rssMiB.after}`]);
    }
    const head = ["case", "req/s", "p50 ms", "p95 ms", "p99 ms", "errors", "non-2xx", "CPU ms/req", "RSS MiB"];
    const w = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
    const fmt = (r: string[]) => r.map((x, i) => (i === 0 ? x.padEnd(w[i]!) : x.padStart(w[i]!))).join("  ");
    console.log("\n" + [fmt(head), w.map((n) => "-".repeat(n)).join("  "), ...rows.map(fmt)].join("\n"));
    console.log(`(server: ${process.env.WEB_CONCURRENCY ?? Math.min(4, availableParallelism())} worker processes on ${availableParallelism()} cores, shared with the load generator; RSS: all server processes)`);

    {
      // Heavy rates beside pages: 10 connections ask the rates API for a large answer (20 steps ×
      // 300 temperatures, several MB, computed in the compute threads) while 40 load the library
      // page; the pages' latency is what counts.
      const heavyBody = JSON.stringify({
        steps: Array.from({ length: 20 }, (_, i) => ({
          id: `h${i}`,
          reactants: [{ species: "A", coef: 1 }],
          products: [{ species: "B", coef: 1 }],
          reversible: false,
          barrier: { form: "dG", dG: 80 + i, unit: "kJ/mol", T: 298.15, standardState: "1M" },
        })),
        temperatures: { values: Array.from({ length: 300 }, (_, j) => 250 + j * 0.5), unit: "K" },
      });
      const page = cases.find((c) => c.kind === "page")!;
      const [heavy, pages] = await Promise.all([
        hammer(appUrl, { connections: 10, duration: seconds, requests: [{ path: "/api/v1/rates", method: "POST", headers: bearer, body: heavyBody }] }),
        hammer(appUrl, { connections: CONNECTIONS - 10, duration: seconds, requests: [{ path: page.opts.path, method: "GET", headers: page.opts.headers }] }),
      ]);
      const line = {
        case: `heavy rates (10 conn., 6000 k per request) beside ${page.name} (40 conn.)`,
        seconds,
        heavyRates: { requestsPerSecond: Math.round(heavy.r.requests.average), p95: heavy.p95, errors: heavy.r.errors + heavy.r.timeouts, non2xx: heavy.r.non2xx },
        pages: { requestsPerSecond: Math.round(pages.r.requests.average), p50: pages.p50, p95: pages.p95, p99: pages.p99, errors: pages.r.errors + pages.r.timeouts, non2xx: pages.r.non2xx },
      };
      console.log(JSON.stringify(line));
      console.log(
        `\nheavy rates beside pages: rates ${line.heavyRates.requestsPerSecond} req/s (p95 ${heavy.p95} ms, ${line.heavyRates.errors} errors, ${heavy.r.non2xx} non-2xx); pages ${line.pages.requestsPerSecond} req/s, p50 ${pages.p50} ms, p95 ${pages.p95} ms, ${line.pages.errors} errors`,
      );
    }

    if (memorySeconds > 0) {
      // Memory: every request kind in turn on 50 connections, RSS sampled every 5 s.
      const mixed: LoadRequest[] = cases.map((c) => ({ path: c.opts.path, method: c.opts.method ?? "GET", headers: c.opts.headers, body: c.opts.body }));
      const samples: Array<{ s: number; rssMiB: number }> = [{ s: 0, rssMiB: Math.round(treeRssMiB(pid)) }];
      const t0 = Date.now();
      const sampler = setInterval(() => samples.push({ s: Math.round((Date.now() - t0) / 1000), rssMiB: Math.round(treeRssMiB(pid)) }), 5000);
      const { r, p50, p95, p99 } = await hammer(appUrl, { connections: CONNECTIONS, duration: memorySeconds, requests: mixed });
      clearInterval(sampler);
      samples.push({ s: Math.round((Date.now() - t0) / 1000), rssMiB: Math.round(treeRssMiB(pid)) });
      // Steadiness: the mean of the second half of the samples against the first half's (MiB),
      // and the range over the whole run.
      const half = Math.floor(samples.length / 2);
      const mean = (xs: typeof samples) => xs.reduce((a, x) => a + x.rssMiB, 0) / xs.length;
      const halfToHalf = Math.round(mean(samples.slice(half)) - mean(samples.slice(0, half)));
      const rss = samples.map((x) => x.rssMiB);
      console.log(
        JSON.stringify({
          case: "memory run (all five requests in turn)",
          connections: CONNECTIONS,
          seconds: memorySeconds,
          requestsPerSecond: Math.round(r.requests.average),
          total: r.requests.total,
          latencyMs: { p50, p95, p99 },
          errors: r.errors + r.timeouts,
          non2xx: r.non2xx,
          rssMiB: samples,
          secondHalfMinusFirstHalfMiB: halfToHalf,
          rangeMiB: [Math.min(...rss), Math.max(...rss)],
        }),
      );
      console.log(`\nmemory run ${memorySeconds} s: ${r.requests.total} requests, ${r.errors + r.timeouts} errors, ${r.non2xx} non-2xx; RSS MiB ${rss.join(" → ")}; range ${Math.min(...rss)}–${Math.max(...rss)}, second half ${halfToHalf >= 0 ? "+" : ""}${halfToHalf} MiB against the first`);
    }
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
