/** SESSION_SECRET from the environment, else one generated once and kept in .data/. */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { randomBytes } from "node:crypto";
import { resolve } from "node:path";
import { projectRoot } from "./env";

export function sessionSecret(): string {
  if (process.env.SESSION_SECRET) return process.env.SESSION_SECRET;
  const file = resolve(projectRoot, ".data/session-secret");
  if (existsSync(file)) return readFileSync(file, "utf8").trim();
  mkdirSync(resolve(projectRoot, ".data"), { recursive: true });
  const secret = randomBytes(32).toString("hex");
  writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}
