/** `npm run db:migrate`: migrates the app's database (embedded or DATABASE_URL) to the latest schema. */
import knexFactory from "knex";
import { failWith, loadDotEnv } from "./env";
import { ensureDatabase } from "./mariadb";
import { knexConfigFromUrl } from "../db/config";
import { migrateLatest } from "../db/migrate";

loadDotEnv();
const handle = await ensureDatabase("app").catch(failWith);
const db = knexFactory(knexConfigFromUrl(handle.url, { min: 0, max: 1 }));
try {
  const applied = await migrateLatest(db);
  console.log(applied.length ? `Applied: ${applied.join(", ")}.` : "The schema is up to date.");
} catch (e) {
  await db.destroy();
  await handle.stop();
  failWith(e);
}
await db.destroy();
await handle.stop();
