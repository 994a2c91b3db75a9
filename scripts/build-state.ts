/** Is the production build current? Compares source modification times with the build stamp. */
import { existsSync, readdirSync, statSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { spawnSync } from "node:child_process";
import { projectRoot } from "./env";

const SOURCES = ["app", "solver", "db", "public", "package-lock.json", "vite.config.ts", "react-router.config.ts", "tsconfig.json"];
const STAMP = resolve(projectRoot, "build/.saddlebook-stamp");

function newestMtime(path: string): number {
  if (!existsSync(path)) return 0;
  const s = statSync(path);
  if (!s.isDirectory()) return s.mtimeMs;
  let newest = s.mtimeMs;
  for (const name of readdirSync(path)) newest = Math.max(newest, newestMtime(join(path, name)));
  return newest;
}

export function buildIsCurrent(): boolean {
  if (!existsSync(resolve(projectRoot, "build/server/index.js")) || !existsSync(STAMP)) return false;
  const stamp = statSync(STAMP).mtimeMs;
  return SOURCES.every((p) => newestMtime(resolve(projectRoot, p)) <= stamp);
}

/** Runs `react-router build`; returns false (after printing its output) when it fails. */
export function buildApp(log: (line: string) => void = console.log): boolean {
  log("Building the app…");
  const started = Date.now();
  const r = spawnSync(resolve(projectRoot, "node_modules/.bin/react-router"), ["build"], {
    cwd: projectRoot,
    encoding: "utf8",
    env: { ...process.env, NODE_ENV: "production" },
  });
  if (r.status !== 0) {
    process.stderr.write(r.stdout + r.stderr);
    return false;
  }
  writeFileSync(STAMP, new Date().toISOString());
  log(`Built in ${((Date.now() - started) / 1000).toFixed(1)} s.`);
  return true;
}
