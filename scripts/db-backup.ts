/** `npm run db:backup [-- file]`: dumps the app's database to .data/backups/saddlebook-<time>.sql (or BACKUP_DIR). */
import { mkdirSync } from "node:fs";
import { resolve } from "node:path";
import { failWith, loadDotEnv, projectRoot } from "./env";
import { ensureDatabase } from "./mariadb";
import { backupDatabase } from "./backup";

loadDotEnv();
const handle = await ensureDatabase("app").catch(failWith);
try {
  const dir = resolve(projectRoot, process.env.BACKUP_DIR ?? ".data/backups");
  mkdirSync(dir, { recursive: true });
  const stamp = new Date().toISOString().replace(/[:.]/g, "-").replace("T", "_").slice(0, 19);
  const file = process.argv[2] ? resolve(process.argv[2]) : resolve(dir, `saddlebook-${stamp}.sql`);
  const bytes = await backupDatabase(handle.url, file);
  console.log(`Backup written: ${file} (${(bytes / 1024).toFixed(1)} KiB).`);
} catch (e) {
  await handle.stop();
  failWith(e);
}
await handle.stop();
