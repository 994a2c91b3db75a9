/**
 * The demo scenario (invented, illustrative). `npm start` seeds it into an empty
 * database; the browser tests seed it into their own database.
 * Seeders run in order inside one transaction: the demo lands whole or not at all.
 * Add a seeder by appending it to SEEDERS.
 */
import type { Knex } from "knex";
import { seedDemoIdentities } from "./demo-identities";
import { seedDemoLibrary } from "./demo-library";

export type Seeder = { name: string; run(db: Knex): Promise<void> };

export const SEEDERS: Seeder[] = [
  { name: "identities", run: seedDemoIdentities },
  { name: "library and mechanisms", run: seedDemoLibrary },
];

/** True when the database holds no users yet. */
export async function isEmpty(db: Knex): Promise<boolean> {
  const row = await db("users").count<{ n: number }[]>({ n: "*" }).first();
  return Number(row?.n ?? 0) === 0;
}

export async function seedDemo(db: Knex, log: (line: string) => void = () => {}): Promise<void> {
  await db.transaction(async (trx) => {
    for (const s of SEEDERS) {
      log(`  seeding ${s.name}…`);
      await s.run(trx);
    }
  });
}
