/**
 * Where the compute queue lives: the Redis named by REDIS_URL (set by `npm start` to its
 * private server, or by the operator to a shared one that `npm run worker` machines also use).
 * QUEUE_PREFIX namespaces the queue's keys (default "saddlebook"), so two installations or
 * parallel test files can share one Redis.
 */
import type { ConnectionOptions } from "bullmq";

export const QUEUE_NAME = "compute";

export function queuePrefix(env: NodeJS.ProcessEnv = process.env): string {
  return env.QUEUE_PREFIX || "saddlebook";
}

export class QueueNotConfigured extends Error {}

/** Connection options for BullMQ from a redis:// or rediss:// URL (host, port, user, password, db number). */
export function connectionFromUrl(url: string | undefined = process.env.REDIS_URL): ConnectionOptions {
  if (!url) throw new QueueNotConfigured("REDIS_URL is not set: the compute queue needs a Redis server (npm start starts one).");
  let u: URL;
  try {
    u = new URL(url);
  } catch {
    throw new QueueNotConfigured("REDIS_URL is not a valid URL: write it as redis://host:6379.");
  }
  if (u.protocol !== "redis:" && u.protocol !== "rediss:") throw new QueueNotConfigured(`REDIS_URL must start with redis:// or rediss:// (it starts with ${u.protocol}//).`);
  const db = u.pathname.replace(/^\//, "");
  return {
    host: u.hostname,
    port: u.port ? Number(u.port) : 6379,
    username: u.username ? decodeURIComponent(u.username) : undefined,
    password: u.password ? decodeURIComponent(u.password) : undefined,
    db: db ? Number(db) : 0,
    tls: u.protocol === "rediss:" ? {} : undefined,
    // A worker's blocking connection must wait for Redis rather than fail a command (BullMQ's rule).
    maxRetriesPerRequest: null,
  };
}
