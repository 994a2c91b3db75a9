/**
 * Dump a database to a file with mariadb-dump and load it back with the mariadb client.
 * The password travels in MYSQL_PWD, never on the command line.
 */
import { spawn } from "node:child_process";
import { createReadStream, createWriteStream, existsSync, statSync } from "node:fs";
import { ConfigProblem } from "./env";

function parts(url: string) {
  const u = new URL(url);
  return {
    host: u.hostname,
    port: u.port || "3306",
    user: decodeURIComponent(u.username),
    password: decodeURIComponent(u.password),
    database: u.pathname.replace(/^\//, ""),
  };
}

function tool(name: "mariadb-dump" | "mariadb"): string {
  for (const dir of ["/usr/bin", "/usr/local/bin"]) if (existsSync(`${dir}/${name}`)) return `${dir}/${name}`;
  throw new ConfigProblem(`${name} is not installed: install Debian's mariadb-client (apt-get install -y mariadb-client).`);
}

function run(cmd: string, args: string[], password: string, io: { in?: NodeJS.ReadableStream; out?: NodeJS.WritableStream }): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, {
      env: { ...process.env, MYSQL_PWD: password },
      stdio: [io.in ? "pipe" : "ignore", io.out ? "pipe" : "ignore", "pipe"],
    });
    let err = "";
    child.stderr!.on("data", (d) => (err += d));
    if (io.in) io.in.pipe(child.stdin!);
    if (io.out) child.stdout!.pipe(io.out);
    child.once("error", reject);
    child.once("exit", (code) => (code === 0 ? resolve() : reject(new ConfigProblem(`${cmd.split("/").pop()} failed: ${err.trim().split("\n").pop()}`))));
  });
}

/** Writes a consistent dump of the database in `url` to `file`; returns its size in bytes. */
export async function backupDatabase(url: string, file: string): Promise<number> {
  const p = parts(url);
  const out = createWriteStream(file, { mode: 0o600 });
  const closed = new Promise<void>((ok, fail) => {
    out.once("close", ok);
    out.once("error", fail);
  });
  await run(
    tool("mariadb-dump"),
    ["-h", p.host, "-P", p.port, "-u", p.user, "--single-transaction", "--routines", "--triggers", "--hex-blob", "--default-character-set=utf8mb4", p.database],
    p.password,
    { out },
  );
  await closed;
  return statSync(file).size;
}

/** Loads a dump made by backupDatabase into the database in `url` (its tables are replaced). */
export async function restoreDatabase(url: string, file: string): Promise<void> {
  if (!existsSync(file)) throw new ConfigProblem(`No backup file at ${file}.`);
  const p = parts(url);
  await run(tool("mariadb"), ["-h", p.host, "-P", p.port, "-u", p.user, "--default-character-set=utf8mb4", p.database], p.password, {
    in: createReadStream(file),
  });
}
