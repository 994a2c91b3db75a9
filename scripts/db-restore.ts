/** `npm run db:restore -- <file>`: loads a backup into the app's database, replacing its tables. */
import { resolve } from "node:path";
import { ConfigProblem, failWith, loadDotEnv } from "./env";
import { ensureDatabase } from "./mariadb";
import { restoreDatabase } from "./backup";

loadDotEnv();
const file = process.argv[2];
if (!file) failWith(new ConfigProblem("Name the backup to restore: npm run db:restore -- .data/backups/saddlebook-<time>.sql"));
const handle = await ensureDatabase("app").catch(failWith);
try {
  await restoreDatabase(handle.url, resolve(file!));
  console.log(`Restored ${resolve(file!)}.`);
} catch (e) {
  await handle.stop();
  failWith(e);
}
await handle.stop();
