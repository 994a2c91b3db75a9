/**
 * Helpers shared by the private servers `npm start` and `npm test` run from the project's
 * `.data/` folder (MariaDB in scripts/mariadb.ts, Redis in scripts/redis.ts): finding a
 * binary, the pid file of a running server, polling until something holds.
 */
import { spawnSync } from "node:child_process";
import { accessSync, constants, existsSync, mkdirSync, readFileSync } from "node:fs";
import { ConfigProblem } from "./env";
import { freePort, portAnswers } from "./ports";

export function findBinary(name: string): string | null {
  for (const dir of ["/usr/sbin", "/usr/bin", "/usr/local/sbin", "/usr/local/bin"]) {
    const p = `${dir}/${name}`;
    if (existsSync(p)) return p;
  }
  const which = spawnSync("sh", ["-c", `command -v ${name}`], { encoding: "utf8" });
  return which.status === 0 && which.stdout.trim() ? which.stdout.trim() : null;
}

export function isRoot(): boolean {
  return typeof process.getuid === "function" && process.getuid() === 0;
}

/** The process id written in a pid file, or null when there is none. */
export function readPidFile(file: string): number | null {
  if (!existsSync(file)) return null;
  const pid = Number(readFileSync(file, "utf8").trim());
  return Number.isInteger(pid) && pid > 0 ? pid : null;
}

export function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

export async function waitFor(check: () => Promise<boolean>, timeoutMs: number, stepMs = 200): Promise<boolean> {
  const end = Date.now() + timeoutMs;
  while (Date.now() < end) {
    if (await check()) return true;
    await new Promise((r) => setTimeout(r, stepMs));
  }
  return false;
}

/** SIGTERM, then SIGKILL when the process is still there after `graceMs`. */
export async function stopProcess(pid: number | null, graceMs = 60_000): Promise<void> {
  if (!pid || !alive(pid)) return;
  process.kill(pid, "SIGTERM");
  const gone = await waitFor(async () => !alive(pid), graceMs, 100);
  if (!gone) process.kill(pid, "SIGKILL");
}

/** Makes sure a server's data folder exists and this user may use it; else one sentence naming `setting`. */
export function usableDir(dir: string, what: string, setting: string): void {
  if (existsSync(dir)) {
    try {
      accessSync(dir, constants.R_OK | constants.W_OK | constants.X_OK);
    } catch {
      throw new ConfigProblem(`The ${what} ${dir} cannot be read or written by this user: fix its permissions or set ${setting} to another folder.`);
    }
    return;
  }
  try {
    mkdirSync(dir, { recursive: true });
  } catch {
    throw new ConfigProblem(`The ${what} ${dir} cannot be created: set ${setting} to a folder you can write.`);
  }
}

/**
 * The port a server about to start should listen on: `port` when nothing answers there; when
 * another program does, a free port (`fallback`, tests) or one sentence naming `setting`.
 */
export async function portToListenOn(port: number, fallback: boolean, what: string, setting: string, log: (line: string) => void): Promise<number> {
  if (!(await portAnswers(port))) return port;
  if (!fallback) throw new ConfigProblem(`Port ${port} on 127.0.0.1 is taken by another program: set ${setting} to a free port (or stop that program).`);
  const other = await freePort();
  log(`Port ${port} is taken by another program: the ${what} uses ${other} instead.`);
  return other;
}
