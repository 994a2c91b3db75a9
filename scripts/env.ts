/** Loads `.env` (KEY=value lines) into process.env without overriding what is already set. */
import { existsSync, readFileSync } from "node:fs";
import { resolve } from "node:path";

export const projectRoot = resolve(import.meta.dirname, "..");

export function loadDotEnv(file = resolve(projectRoot, ".env")): void {
  if (!existsSync(file)) return;
  for (const raw of readFileSync(file, "utf8").split(/\r?\n/)) {
    const line = raw.trim();
    if (!line || line.startsWith("#")) continue;
    const eq = line.indexOf("=");
    if (eq < 1) continue;
    const key = line.slice(0, eq).trim();
    let value = line.slice(eq + 1).trim();
    if ((value.startsWith('"') && value.endsWith('"')) || (value.startsWith("'") && value.endsWith("'"))) {
      value = value.slice(1, -1);
    }
    if (process.env[key] === undefined) process.env[key] = value;
  }
}

/** A configuration problem a person can fix: printed as one sentence, no stack trace. */
export class ConfigProblem extends Error {}

export function failWith(problem: unknown): never {
  if (problem instanceof ConfigProblem) {
    console.error(`\n✖ ${problem.message}\n`);
  } else {
    console.error(problem);
  }
  process.exit(1);
}
