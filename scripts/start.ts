/**
 * `npm start` (production build) and `npm run dev` (Vite dev server).
 *
 * Ensures the database (the embedded MariaDB unless DATABASE_URL is set) and the compute
 * queue's Redis (a private redis-server unless REDIS_URL is set), migrates the database,
 * seeds the illustrative demo scenario into an empty database, builds the app when the
 * build is missing or stale, starts the local fakes of hosted services, and serves the
 * app on 127.0.0.1:PORT. Ctrl-C stops everything this script started.
 */
import knexFactory from "knex";
import { ConfigProblem, failWith, loadDotEnv } from "./env";
import { ensureDatabase, type DatabaseHandle } from "./mariadb";
import { watchDatabase, type DatabaseWatch } from "./database-watch";
import { ensureRedis, type RedisHandle } from "./redis";
import { startQueueWorkers, type QueueWorkers } from "./queue-workers";
import { portFree } from "./ports";
import { buildApp, buildIsCurrent } from "./build-state";
import { startAppServer, type AppServer } from "./app-server";
import { standInsWanted, startDevServices, type DevServices } from "./dev-services";
import { sessionSecret } from "./session-secret";
import { knexConfigFromUrl } from "../db/config";
import { migrateLatest } from "../db/migrate";
import { isEmpty, seedDemo } from "../db/seeds/index";
import { DEMO_PASSWORD, DEMO_USERS } from "../db/seeds/demo-identities";

const dev = process.argv.includes("--dev");
const log = (line: string) => console.log(line);

let database: DatabaseHandle | undefined;
let redis: RedisHandle | undefined;
let queueWorkers: QueueWorkers | undefined;
let services: DevServices | undefined;
let app: AppServer | undefined;
let stopping = false;
let dbWatch: DatabaseWatch | undefined;
let redisWatch: DatabaseWatch | undefined;

async function shutdown(code: number): Promise<never> {
  if (!stopping) {
    stopping = true;
    log("\nStopping…");
    dbWatch?.stop();
    redisWatch?.stop();
    await app?.stop().catch(() => {});
    await queueWorkers?.stop().catch(() => {});
    await services?.stop().catch(() => {});
    await redis?.stop().catch(() => {});
    await database?.stop().catch(() => {});
  }
  process.exit(code);
}

process.on("SIGINT", () => void shutdown(0));
process.on("SIGTERM", () => void shutdown(0));

async function main(): Promise<void> {
  loadDotEnv();
  const portText = process.env.PORT ?? "3000";
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 1 || port > 65535) {
    throw new ConfigProblem(`PORT must be a port number from 1 to 65535 (got "${portText}").`);
  }
  if (!(await portFree(port))) {
    throw new ConfigProblem(`Port ${port} on 127.0.0.1 is already in use: stop the program using it, or set PORT in .env to a free port.`);
  }

  database = await ensureDatabase("app");
  redis = await ensureRedis("app", log);
  const db = knexFactory(knexConfigFromUrl(database.url, { min: 0, max: 2 }));
  try {
    const applied = await migrateLatest(db);
    if (applied.length) log(`Applied ${applied.length} migration(s).`);
    if (await isEmpty(db)) {
      log("Empty database: seeding the illustrative demo scenario…");
      await seedDemo(db, log);
    }
  } finally {
    await db.destroy();
  }

  if (!dev && !buildIsCurrent()) {
    if (!buildApp(log)) throw new ConfigProblem("The app did not build: fix the errors printed above and start again.");
  }

  const appUrl = `http://127.0.0.1:${port}`;
  const setting = process.env.DEV_STANDINS;
  if (setting !== undefined && setting !== "" && setting !== "0" && setting !== "1") {
    throw new ConfigProblem(`DEV_STANDINS must be 1 (local stand-ins on) or 0 (off), got "${setting}".`);
  }
  const standins = standInsWanted(dev, setting);
  services = await startDevServices({ log, appUrl, databaseUrl: database.url, standins });
  app = await startAppServer({
    port,
    dev,
    env: {
      ...services.env,
      DATABASE_URL: database.url,
      REDIS_URL: redis.url,
      SESSION_SECRET: sessionSecret(),
      APP_URL: process.env.APP_URL ?? appUrl,
    },
  });
  app.child.once("exit", (code) => {
    if (!stopping) {
      console.error(`The app server stopped (exit code ${code}).`);
      void shutdown(1);
    }
  });

  // The production server runs the app's queue workers itself (scripts/serve.ts); Vite's
  // development server does not, so here they run beside it.
  if (dev) queueWorkers = await startQueueWorkers({ databaseUrl: database.url, redisUrl: redis.url, log });

  const giveUp = (sentence: string) => {
    console.error(`\n✖ ${sentence}\n`);
    void shutdown(1);
  };
  if (redis.dataDir) {
    redisWatch = watchDatabase({
      dataDir: redis.dataDir,
      name: "Redis",
      logFile: `${redis.dataDir}/redis.log`,
      meanwhile: "queued ensembles wait meanwhile",
      running: () => redis!.running(),
      restart: async () => {
        redis = await ensureRedis("app", log);
      },
      giveUp,
      log,
    });
  }
  if (database.dataDir) {
    dbWatch = watchDatabase({
      dataDir: database.dataDir,
      running: () => database!.running(),
      restart: async () => {
        database = await ensureDatabase("app");
      },
      giveUp,
      log,
    });
  }

  log("");
  log(`Saddlebook is running at ${app.url}/ ${dev ? "(development server)" : ""}`);
  log(`Demo sign-in (illustrative data), password "${DEMO_PASSWORD}":`);
  for (const u of DEMO_USERS) log(`  ${u.role.padEnd(8)} ${u.email}`);
  for (const n of services.notes) log(n);
  log(
    standins
      ? `Local stand-ins ON${dev ? "" : " (DEV_STANDINS=1)"}: the stand-in sign-on provider lets anyone pick any identity and an admin can read caught mail at /dev/mailbox. For development only; never on a server others can reach.`
      : `Local stand-ins off${dev ? " (DEV_STANDINS=0)" : " (production server)"}: no stand-in sign-on, no mailbox page. DEV_STANDINS=1 turns them on for development use.`,
  );
  log("Press Ctrl-C to stop.");
}

main().catch(async (e) => {
  await app?.stop().catch(() => {});
  await queueWorkers?.stop().catch(() => {});
  await services?.stop().catch(() => {});
  await redis?.stop().catch(() => {});
  await database?.stop().catch(() => {});
  failWith(e);
});
