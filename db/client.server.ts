/** The app's shared Knex instance (server only). */
import knexFactory, { type Knex } from "knex";
import { knexConfigFromUrl } from "./config";

let instance: Knex | undefined;

export function getDb(): Knex {
  if (!instance) {
    const url = process.env.DATABASE_URL;
    if (!url) throw new Error("DATABASE_URL is not set: start the app with `npm start`, or set it in .env.");
    instance = knexFactory(knexConfigFromUrl(url));
  }
  return instance;
}

/** Is the database answering? Returns null when it is, else a one-sentence reason. */
export async function databaseProblem(): Promise<string | null> {
  try {
    await getDb().raw("select 1");
    return null;
  } catch (e) {
    const err = e as { code?: string; message?: string };
    return `The database is not answering (${err.code ?? err.message ?? "unknown error"}).`;
  }
}
