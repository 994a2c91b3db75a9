/**
 * The simulation pool: stored runs execute in worker threads (piscina) off the request thread.
 *
 * For each run: queued → running when a worker slot is free; the worker reports the simulated
 * time reached through shared memory, written to the run every `tickMs`; a cancellation (from
 * this process or any other, through the run's cancel_requested_at) raises a shared flag the
 * engine checks at every step; a watchdog terminates a worker that overruns its wall-time
 * budget by more than `graceMs`; a worker that crashes or is terminated marks the run failed
 * with the reason. Results, analysis and statistics are written in one transaction
 * (db/access/runs.server.ts finishRun) — a run is either done with everything or has nothing.
 */
import type { Knex } from "knex";
import { Piscina } from "piscina";
import { existsSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { claimRun, currentServerProcess, endRunWithoutResults, failInterruptedRuns, finishRun, getRun, isCancelRequested, updateProgress } from "../../db/access/runs.server";
import type { RunTaskInput, RunTaskResult } from "./run-task";
import { computeThreads } from "./threads.server";
import type { FitTaskInput, FitTaskResult } from "./fit-task";

export interface ComputeOptions {
  /** Worker module (file path or URL); default app/compute/simulate-worker.mjs. */
  workerFile?: string;
  maxThreads?: number;
  /** ms between progress writes and cancellation checks. */
  tickMs?: number;
  /** ms a worker may overrun its wall-time budget (analysis runs, start-up) before it is terminated. */
  graceMs?: number;
}

/** Finds simulate-worker.mjs beside this module (tests, dev) or under the project root (built server). */
export function defaultWorkerFile(): string {
  const candidates: string[] = [];
  try {
    candidates.push(join(dirname(fileURLToPath(import.meta.url)), "simulate-worker.mjs"));
  } catch {
    /* not a file URL */
  }
  if (process.env.SADDLEBOOK_ROOT) candidates.push(resolve(process.env.SADDLEBOOK_ROOT, "app/compute/simulate-worker.mjs"));
  candidates.push(resolve(process.cwd(), "app/compute/simulate-worker.mjs"));
  const found = candidates.find((c) => existsSync(c));
  if (!found) throw new Error(`The simulation worker module was not found (looked in ${candidates.join(", ")}).`);
  return found;
}

interface Active {
  control: Int32Array;
  abort: AbortController;
  cancelAsked: boolean;
}

export class ComputeService {
  private pool: Piscina;
  private waiting: number[] = [];
  private active = new Map<number, Active>();
  private running = 0;
  private readonly maxThreads: number;
  private readonly tickMs: number;
  private readonly graceMs: number;
  private settled = new Map<number, Promise<void>>();
  private resolvers = new Map<number, () => void>();

  constructor(
    private readonly db: Knex,
    opts: ComputeOptions = {},
  ) {
    this.maxThreads = opts.maxThreads ?? computeThreads();
    this.tickMs = opts.tickMs ?? 250;
    this.graceMs = opts.graceMs ?? 15_000;
    const file = opts.workerFile ?? defaultWorkerFile();
    this.pool = new Piscina({
      filename: file.startsWith("file:") ? file : pathToFileURL(file).href,
      minThreads: 0,
      maxThreads: this.maxThreads,
      idleTimeout: 60_000,
      resourceLimits: { maxOldGenerationSizeMb: 2048 },
    });
  }

  /** Queue a stored run; the promise settles when the run has reached its final status. */
  submit(runId: number): Promise<void> {
    let p = this.settled.get(runId);
    if (p) return p;
    p = new Promise<void>((r) => this.resolvers.set(runId, r));
    this.settled.set(runId, p);
    this.waiting.push(runId);
    this.pump();
    return p;
  }

  /** A barrier fit in a worker; terminated when it overruns its budget by more than graceMs. */
  async fit(input: FitTaskInput): Promise<FitTaskResult> {
    const control = new SharedArrayBuffer(4);
    const abort = new AbortController();
    const timer = setTimeout(() => abort.abort(new Error("budget")), input.maxWallMs + this.graceMs);
    try {
      return (await this.pool.run({ kind: "fit", input, progress: new SharedArrayBuffer(16), control }, { signal: abort.signal })) as FitTaskResult;
    } catch (e) {
      if (abort.signal.aborted) return { ok: false, message: `The fit exceeded its wall-time budget of ${input.maxWallMs} ms and was stopped.` };
      return { ok: false, message: `The fit worker stopped unexpectedly (${e instanceof Error ? e.message : String(e)}).` };
    } finally {
      clearTimeout(timer);
    }
  }

  /** Raise the stop flag of a running run in this process (the DB flag is set by the caller). */
  cancel(runId: number): void {
    const a = this.active.get(runId);
    if (!a) return;
    this.stop(a);
  }

  /** Runs this process is working on or holding. */
  get load(): { running: number; waiting: number } {
    return { running: this.running, waiting: this.waiting.length };
  }

  async destroy(): Promise<void> {
    for (const a of this.active.values()) this.stop(a);
    await this.pool.destroy();
  }

  private stop(a: Active): void {
    if (a.cancelAsked) return;
    a.cancelAsked = true;
    Atomics.store(a.control, 0, 1);
    // A worker that does not stop within 3 s is terminated.
    setTimeout(() => a.abort.abort(new Error("cancel-timeout")), 3000).unref();
  }

  private pump(): void {
    while (this.running < this.maxThreads && this.waiting.length > 0) {
      const id = this.waiting.shift()!;
      this.running++;
      void this.execute(id)
        .catch(() => {})
        .finally(() => {
          this.running--;
          this.resolvers.get(id)?.();
          this.resolvers.delete(id);
          this.settled.delete(id);
          this.pump();
        });
    }
  }

  private async execute(id: number): Promise<void> {
    const run = await getRun(this.db, id);
    if (!run || !(await claimRun(this.db, id))) return; // gone or cancelled while queued
    const progress = new SharedArrayBuffer(16);
    const control = new SharedArrayBuffer(4);
    const prog = new Float64Array(progress);
    const active: Active = { control: new Int32Array(control), abort: new AbortController(), cancelAsked: false };
    this.active.set(id, active);
    const input: RunTaskInput = { snapshot: run.snapshot, conditions: run.conditions, solver: run.solver, analysis: run.analysisRequest ?? undefined };
    const budgetMs = run.solver.wallTimeMs;
    let overran = false;
    let lastWritten = 0;
    let ticking = false;
    const startedAt = Date.now();
    const tick = async () => {
      if (ticking) return;
      ticking = true;
      try {
        if (prog[0] > lastWritten) {
          lastWritten = prog[0];
          await updateProgress(this.db, id, lastWritten);
        }
        if (!active.cancelAsked && (await isCancelRequested(this.db, id))) this.stop(active);
        if (!overran && prog[1] === 1 && Date.now() - startedAt > budgetMs + this.graceMs) {
          overran = true;
          active.abort.abort(new Error("budget"));
        }
      } catch {
        /* a missed progress write is harmless; the next tick retries */
      } finally {
        ticking = false;
      }
    };
    const timer = setInterval(() => void tick(), this.tickMs);
    let result: RunTaskResult | null = null;
    let crash: string | null = null;
    try {
      result = (await this.pool.run({ kind: "run", input, progress, control }, { signal: active.abort.signal })) as RunTaskResult;
    } catch (e) {
      crash = e instanceof Error ? e.message : String(e);
    } finally {
      clearInterval(timer);
      this.active.delete(id);
    }

    if (crash !== null || !result) {
      if (overran) {
        await endRunWithoutResults(this.db, id, "failed", "budget", `The run exceeded its wall-time budget of ${budgetMs} ms and was stopped at t = ${prog[0].toPrecision(4)} s of ${run.tEnd} s. Nothing was stored.`);
      } else if (active.cancelAsked) {
        await endRunWithoutResults(this.db, id, "cancelled", "cancelled", `Cancelled at t = ${prog[0].toPrecision(4)} s of ${run.tEnd} s.`);
      } else {
        await endRunWithoutResults(this.db, id, "failed", "crash", `The simulation worker stopped unexpectedly (${crash ?? "no result"}). Nothing was stored.`);
      }
      return;
    }
    if (result.ok) {
      const done = await finishRun(this.db, id, result.value);
      if (!done) await endRunWithoutResults(this.db, id, "cancelled", "cancelled", "Cancelled just as it finished; the results were not stored.");
      return;
    }
    if (result.code === "cancelled") {
      await endRunWithoutResults(this.db, id, "cancelled", "cancelled", `Cancelled at t = ${prog[0].toPrecision(4)} s of ${run.tEnd} s.`);
    } else {
      const where = result.path ? ` (${result.path})` : "";
      await endRunWithoutResults(this.db, id, "failed", result.code, `${result.message}${where}`);
    }
  }
}

const KEY = Symbol.for("saddlebook.compute");

/**
 * The process-wide compute service on the app's database. On first use, runs left queued or
 * running by an earlier server process are marked failed with the reason, so no run waits
 * forever: those created before the database's clock at that moment (one app process per
 * database, or the production server's supervisor on behalf of all its workers). Callers that create runs await `ready` first, so their own runs are
 * never among them.
 */
export function getComputeService(db: Knex): ComputeService & { ready: Promise<void> } {
  const g = globalThis as unknown as Record<symbol, (ComputeService & { ready: Promise<void> }) | undefined>;
  if (!g[KEY]) {
    const svc = new ComputeService(db) as ComputeService & { ready: Promise<void> };
    // In a worker of the production server its supervisor has done this before starting the
    // workers, and does it per worker when one stops (scripts/serve.ts).
    svc.ready = currentServerProcess()
      ? Promise.resolve()
      : db
          .raw("SELECT NOW(3) AS t")
          .then((r: unknown) => {
            const rows = (Array.isArray(r) ? r[0] : r) as { t: Date }[];
            return failInterruptedRuns(db, rows[0].t);
          })
          .then(() => undefined, () => undefined);
    g[KEY] = svc;
  }
  return g[KEY]!;
}
