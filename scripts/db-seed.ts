/** `npm run db:seed`: seeds the illustrative demo scenario into the app's database when it holds no users. */
import knexFactory from "knex";
import { failWith, loadDotEnv } from "./env";
import { ensureDatabase } from "./mariadb";
import { knexConfigFromUrl } from "../db/config";
import { migrateLatest } from "../db/migrate";
import { isEmpty, seedDemo } from "../db/seeds/index";

loadDotEnv();
const handle = await ensureDatabase("app").catch(failWith);
const db = knexFactory(knexConfigFromUrl(handle.url, { min: 0, max: 1 }));
try {
  await migrateLatest(db);
  if (await isEmpty(db)) {
    await seedDemo(db, console.log);
    console.log("Demo scenario seeded.");
  } else {
    console.log("The database already holds users; nothing seeded.");
  }
} catch (e) {
  await db.destroy();
  await handle.stop();
  failWith(e);
}
await db.destroy();
await handle.stop();
