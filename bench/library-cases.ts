/**
 * Library benchmarks (`npm run bench -- library`): a bench database with 50 000 invented,
 * illustrative library steps over 2 000 species, then
 *   - search: searchSteps() with typo-laden queries and filters, p50/p95 (target p95 < 50 ms),
 *     and the same through HTTP GET /api/v1/steps on the production build;
 *   - library page first render: GET /library?q=… full server-rendered HTML (target < 300 ms);
 *   - a 500-step mechanism: getMechanism() and GET /mechanisms/:id (target < 200 ms).
 * Timings are sequential wall times on 127.0.0.1 (one request at a time).
 */
import knexFactory, { type Knex } from "knex";
import { randomBytes } from "node:crypto";
import { performance } from "node:perf_hooks";
import { createCookieSessionStorage } from "react-router";
import type { BenchCase, BenchSuite } from "./types.ts";
import { ensureDatabase } from "../scripts/mariadb";
import { buildApp, buildIsCurrent } from "../scripts/build-state";
import { startAppServer } from "../scripts/app-server";
import { startDevServices } from "../scripts/dev-services";
import { freePort } from "../scripts/ports";
import { knexConfigFromUrl, withDatabase } from "../db/config";
import { migrateLatest } from "../db/migrate";
import { seedDemoIdentities } from "../db/seeds/demo-identities";
import { searchSteps } from "../db/access/steps.server";
import { createMechanism, getMechanism } from "../db/access/mechanisms.server";
import { stepToEngine, type DocumentStep } from "../solver/exchange-format";
import type { Actor } from "../app/auth/policy.server";

const N_STEPS = Number(process.env.BENCH_LIBRARY_STEPS ?? 50_000);
const N_SPECIES = 2_000;

/** Deterministic pseudo-random numbers (mulberry32), so every run seeds the same library. */
function rng(seed: number) {
  return () => {
    seed |= 0;
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const SYL = ["ace", "bro", "chlo", "cyclo", "eth", "meth", "prop", "but", "phen", "benz", "tolu", "xyl", "pyr", "fur", "thio", "amin", "nitr", "carb", "ox", "hydr", "iod", "sil", "bor", "phos"];
const END = ["ane", "ene", "yne", "ol", "al", "one", "ide", "ate", "ine", "amide", "ester", "ether", "oxide"];
const METHODS = ["illustrative DFT estimate", "illustrative stopped-flow series", "illustrative NMR kinetics", "illustrative group additivity", "illustrative literature value"];
const SOURCES = ["computed", "measured", "estimated", "literature"] as const;
const TAGS = ["acylation", "oxidation", "hydrolysis", "radical", "catalysed", "background", "side-reaction", "elimination", "substitution", "addition"];

async function seedBenchLibrary(db: Knex): Promise<{ author: Actor; viewer: Actor; words: string[] }> {
  await seedDemoIdentities(db);
  const u = async (email: string): Promise<Actor> => {
    const r = await db("users").where({ email }).first("id", "role");
    return { id: r.id, role: r.role, groupIds: await db("memberships").where({ user_id: r.id }).pluck("group_id") };
  };
  const author = await u("author@saddlebook.test");
  const viewer = await u("viewer@saddlebook.test");
  const rand = rng(42);
  const pick = <T,>(a: readonly T[]) => a[Math.floor(rand() * a.length)];
  const words: string[] = [];
  const species = Array.from({ length: N_SPECIES }, (_, i) => {
    const label = `${pick(SYL)}${pick(SYL)}${pick(END)}-${i}`;
    words.push(label.replace(/-\d+$/, ""));
    const c = 1 + Math.floor(rand() * 12);
    return { id: i + 1, label, formula: `C${c}H${2 * c + 2}O`, charge: 0, phase: "solution", created_by: author.id };
  });
  for (let i = 0; i < species.length; i += 1000) await db("species").insert(species.slice(i, i + 1000));

  const BATCH = 1000;
  for (let start = 0; start < N_STEPS; start += BATCH) {
    const steps: Record<string, unknown>[] = [];
    const versions: Record<string, unknown>[] = [];
    const terms: Record<string, unknown>[] = [];
    const tags: Record<string, unknown>[] = [];
    for (let i = start; i < Math.min(N_STEPS, start + BATCH); i++) {
      const id = i + 1;
      const a = 1 + Math.floor(rand() * N_SPECIES);
      const b = 1 + Math.floor(rand() * N_SPECIES);
      const c = 1 + Math.floor(rand() * N_SPECIES);
      const bimolecular = rand() < 0.7;
      const reactants = bimolecular ? [{ species: `s${a}`, coef: 1 }, { species: `s${b}`, coef: 1 }] : [{ species: `s${a}`, coef: 1 }];
      const dG = Math.round((50 + rand() * 60) * 10) / 10;
      const source = pick(SOURCES);
      const tagList = [pick(TAGS), pick(TAGS), "illustrative"].filter((t, k, arr) => arr.indexOf(t) === k);
      const tmin = 250 + Math.floor(rand() * 50);
      const content: DocumentStep = {
        id: `step-${id}`,
        reactants,
        products: [{ species: `s${c}`, coef: 1 }],
        reversible: false,
        barrier: { form: "dG", dG, unit: "kJ/mol", T: 298.15, standardState: "1M" },
        validRange: { Tmin: tmin, Tmax: tmin + 100 },
        provenance: { source, method: pick(METHODS), citation: "Saddlebook bench set (invented)", notes: "Illustrative bench data." },
        tags: tagList,
      };
      const kin = stepToEngine(content);
      if (!kin.ok) throw new Error(kin.error.message);
      const label = `${species[a - 1].label}${bimolecular ? " + " + species[b - 1].label : ""} → ${species[c - 1].label}`;
      const status = rand() < 0.7 ? "approved" : rand() < 0.5 ? "proposed" : "draft";
      steps.push({ id, owner_id: author.id, status, current_version_number: 1 });
      versions.push({
        id,
        step_id: id,
        number: 1,
        status,
        author_id: author.id,
        message: "Bench seed.",
        label,
        content: JSON.stringify(content),
        kinetics: JSON.stringify(kin.value),
        barrier_form: "dG",
        molecularity: reactants.length,
        reversible: false,
        dg298: dG * 1000,
        ea298: dG * 1000 + 2479,
        t_min: tmin,
        t_max: tmin + 100,
        source_type: source,
        method: content.provenance!.method,
        citation: content.provenance!.citation,
        illustrative: true,
        tags: JSON.stringify(tagList),
        search_text: [label, species[a - 1].formula, ...tagList, source, content.provenance!.method, content.provenance!.citation, content.provenance!.notes].join(" \n "),
      });
      reactants.forEach((r, k) => terms.push({ step_version_id: id, side: "r", position: k, species_id: Number(r.species.slice(1)), coef: 1 }));
      terms.push({ step_version_id: id, side: "p", position: 0, species_id: c, coef: 1 });
      for (const t of tagList) tags.push({ step_id: id, tag: t });
    }
    await db.transaction(async (trx) => {
      await trx("steps").insert(steps);
      await trx("step_versions").insert(versions);
      await trx("step_version_terms").insert(terms);
      await trx("step_tags").insert(tags);
    });
  }
  await db.raw("UPDATE steps SET current_version_id = id, public_version_id = IF(status IN ('approved','deprecated'), id, NULL)");
  await db.raw("ANALYZE TABLE steps, step_versions, step_tags, species");
  return { author, viewer, words };
}

function percentile(xs: number[], p: number): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)];
}

async function timeIt(n: number, f: (i: number) => Promise<unknown>): Promise<number[]> {
  for (let i = 0; i < 3; i++) await f(i); // warm-up
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    await f(i);
    out.push(performance.now() - t0);
  }
  return out;
}

function caseOf(name: string, ms: number[], target: number, extra: Record<string, number | string> = {}): BenchCase {
  const p50 = percentile(ms, 50);
  const p95 = percentile(ms, 95);
  return { name, wallMsMedian: p50, runs: ms.length, extra: { p95Ms: Number(p95.toFixed(2)), targetMs: target, meetsTarget: p95 < target ? "yes" : "NO", ...extra } };
}

/** Typo-laden queries: drop or swap a letter in a species word, sometimes with filters. */
function queries(words: string[]): Array<Parameters<typeof searchSteps>[2]> {
  const r = rng(7);
  const typo = (w: string) => {
    const k = 1 + Math.floor(r() * (w.length - 2));
    return r() < 0.5 ? w.slice(0, k) + w.slice(k + 1) : w.slice(0, k) + w[k + 1] + w[k] + w.slice(k + 2);
  };
  return Array.from({ length: 200 }, (_, i) => {
    const w = words[Math.floor(r() * words.length)];
    const q = i % 3 === 0 ? typo(w) : i % 3 === 1 ? w : `${w} ${TAGS[i % TAGS.length]}`;
    return { q, T: 310, limit: 50, ...(i % 4 === 0 ? { molecularity: [2] } : {}), ...(i % 5 === 0 ? { source: ["computed" as const] } : {}), ...(i % 7 === 0 ? { tmin: 300, tmax: 340 } : {}) };
  });
}

export async function runLibraryBench(): Promise<BenchCase[]> {
  const server = await ensureDatabase("test");
  const name = `saddlebook_t_benchlib_${randomBytes(3).toString("hex")}`;
  const admin = knexFactory(knexConfigFromUrl(server.url, { min: 0, max: 1 }));
  await admin.raw("CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci", [name]);
  const url = withDatabase(server.url, name);
  const db = knexFactory(knexConfigFromUrl(url, { min: 0, max: 8 }));
  const cases: BenchCase[] = [];
  let stopApp = async () => {};
  let stopServices = async () => {};
  try {
    await migrateLatest(db);
    const t0 = performance.now();
    const { author, viewer, words } = await seedBenchLibrary(db);
    console.error(`seeded ${N_STEPS} steps in ${((performance.now() - t0) / 1000).toFixed(1)} s`);

    const qs = queries(words);
    const searchMs = await timeIt(qs.length, (i) => searchSteps(db, viewer, qs[i]));
    cases.push(caseOf(`library search (data layer, ${N_STEPS} steps)`, searchMs, 50));
    const plainMs = await timeIt(50, () => searchSteps(db, viewer, { limit: 50, T: 298.15 }));
    cases.push(caseOf("library list, no query (data layer)", plainMs, 50));

    // A 500-step mechanism of approved library steps.
    const approved = await db("steps").where("status", "approved").orderBy("id").limit(500).pluck("current_version_id");
    const mech = await createMechanism(db, author, { name: "500-step bench mechanism (illustrative)", visibility: "public", steps: approved.map((v: number) => ({ kind: "library", stepVersionId: v })) });
    const mechMs = await timeIt(30, () => getMechanism(db, author, mech.id));
    cases.push(caseOf("500-step mechanism load (data layer)", mechMs, 200));

    // The production build, for page renders over HTTP.
    if (!buildIsCurrent() && !buildApp()) throw new Error("The build failed.");
    const port = await freePort();
    const appUrl = `http://127.0.0.1:${port}`;
    const secret = randomBytes(32).toString("hex");
    const services = await startDevServices({ appUrl, databaseUrl: url, standins: true });
    stopServices = services.stop;
    const app = await startAppServer({ port, quiet: true, env: { ...services.env, DATABASE_URL: url, SESSION_SECRET: secret, APP_URL: appUrl } });
    stopApp = app.stop;
    const storage = createCookieSessionStorage({ cookie: { name: "__saddlebook", httpOnly: true, sameSite: "lax", path: "/", secrets: [secret], maxAge: 43200 } });
    const session = await storage.getSession();
    session.set("userId", viewer.id);
    session.set("csrf", "bench");
    session.set("signedInAt", Date.now());
    session.set("method", "password");
    const cookie = (await storage.commitSession(session)).split(";")[0]!;
    const get = async (path: string) => {
      const r = await fetch(appUrl + path, { headers: { Cookie: cookie } });
      const body = await r.text();
      if (!r.ok) throw new Error(`GET ${path} → ${r.status}: ${body.slice(0, 200)}`);
      return body;
    };
    const apiMs = await timeIt(100, (i) => get(`/api/v1/steps?q=${encodeURIComponent(qs[i].q ?? "")}&T=310&limit=50`));
    cases.push(caseOf("search API GET /api/v1/steps?q= (HTTP)", apiMs, 50));
    const pageMs = await timeIt(40, (i) => get(`/library?q=${encodeURIComponent(qs[i].q ?? "")}&T=310`));
    cases.push(caseOf("library page first render GET /library?q= (HTML)", pageMs, 300));
    const emptyPageMs = await timeIt(20, () => get(`/library`));
    cases.push(caseOf("library page first render GET /library (HTML, 100 newest)", emptyPageMs, 300));
    const mechPageMs = await timeIt(20, () => get(`/mechanisms/${mech.id}`));
    cases.push(caseOf("500-step mechanism page GET /mechanisms/:id (HTML)", mechPageMs, 200));
    const mechDataMs = await timeIt(20, () => get(`/mechanisms/${mech.id}.data`));
    cases.push(caseOf("500-step mechanism page data GET /mechanisms/:id.data (client navigation)", mechDataMs, 200));
  } finally {
    await stopApp().catch(() => {});
    await stopServices().catch(() => {});
    await db.destroy();
    if (!process.env.BENCH_KEEP_DB) await admin.raw("DROP DATABASE IF EXISTS ??", [name]);
    await admin.destroy();
    await server.stop?.();
  }
  return cases;
}

export const suite: BenchSuite = { name: "library", run: runLibraryBench };
