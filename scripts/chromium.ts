/** Finds Debian's Chromium for the browser tests, installing it with apt-get as root. */
import { existsSync } from "node:fs";
import { spawnSync } from "node:child_process";
import { ConfigProblem } from "./env";

const INSTALL = "apt-get update && DEBIAN_FRONTEND=noninteractive apt-get install -y chromium";

export function ensureChromium(log: (line: string) => void = console.log): string {
  const configured = process.env.CHROMIUM_PATH;
  if (configured) {
    if (!existsSync(configured)) throw new ConfigProblem(`CHROMIUM_PATH points to ${configured}, which does not exist.`);
    return configured;
  }
  for (const p of ["/usr/bin/chromium", "/usr/bin/chromium-browser"]) if (existsSync(p)) return p;
  if (typeof process.getuid !== "function" || process.getuid() !== 0) {
    throw new ConfigProblem(`Chromium is needed for the browser tests. Install it with: sudo sh -c '${INSTALL}'`);
  }
  log("Chromium is not installed: installing Debian's chromium with apt-get…");
  const r = spawnSync("sh", ["-c", INSTALL], { stdio: ["ignore", "ignore", "inherit"] });
  if (r.status !== 0 || !existsSync("/usr/bin/chromium")) {
    throw new ConfigProblem(`Installing Chromium failed; run it yourself: ${INSTALL}`);
  }
  return "/usr/bin/chromium";
}
