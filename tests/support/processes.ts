/** The processes of a server a test started (Linux `ps`), to see workers come and go. */
import { execFileSync } from "node:child_process";

/** Direct children of a process. */
export function childrenOf(pid: number): number[] {
  try {
    return execFileSync("ps", ["-o", "pid=", "--ppid", String(pid)], { encoding: "utf8" })
      .split("\n")
      .map((s) => Number(s.trim()))
      .filter((n) => n > 0);
  } catch {
    return [];
  }
}

/** Every process below `pid`, sorted. */
export function descendantsOf(pid: number): number[] {
  const out: number[] = [];
  const visit = (p: number) => {
    for (const k of childrenOf(p)) (out.push(k), visit(k));
  };
  visit(pid);
  return out.sort();
}
