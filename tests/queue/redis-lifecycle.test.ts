/**
 * The Redis `npm start` and `npm test` run for the compute queue (scripts/redis.ts): a private
 * server that starts, is reused, keeps an append-only file only for the app, stops; REDIS_URL
 * used as it is; one clear sentence for what a person must fix.
 */
import { afterAll, describe, expect, it } from "vitest";
import { existsSync, rmSync } from "node:fs";
import { resolve } from "node:path";
import { randomBytes } from "node:crypto";
import { Redis } from "ioredis";
import { ConfigProblem, projectRoot } from "../../scripts/env";
import { freePort } from "../../scripts/ports";
import { ensureEmbeddedRedis, ensureRedis, ensureRedisInstalled, redisAnswers, testRedisPort } from "../../scripts/redis";
import { testRedisUrl } from "../support/queue";
import { closeQueues, queueProblem } from "../../app/queue/queue.server";

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function scratchDir(): string {
  const d = resolve(projectRoot, ".data", `redis-scratch-${randomBytes(4).toString("hex")}`);
  dirs.push(d);
  return d;
}

async function config(url: string, name: string): Promise<string | undefined> {
  const c = new Redis(url);
  try {
    const pair = (await c.config("GET", name)) as string[];
    return pair[1];
  } finally {
    c.disconnect();
  }
}

describe("private Redis", () => {
  it("starts on loopback, is reused, stops", async () => {
    const dataDir = scratchDir();
    const port = await freePort();
    const lines: string[] = [];
    const h = await ensureEmbeddedRedis({ dataDir, port, persistent: true, log: (l) => lines.push(l) });
    try {
      expect(h.url).toBe(`redis://127.0.0.1:${port}`);
      expect(h.startedHere).toBe(true);
      expect(h.running()).toBe(true);
      expect(await redisAnswers(h.url)).toEqual({ ok: true });
      expect(await config(h.url, "bind")).toBe("127.0.0.1");
      expect(await config(h.url, "protected-mode")).toBe("yes");
      expect(await config(h.url, "appendonly")).toBe("yes");
      expect(await config(h.url, "maxmemory-policy")).toBe("noeviction");
      const again = await ensureEmbeddedRedis({ dataDir, port, persistent: true, log: (l) => lines.push(l) });
      expect(again.startedHere).toBe(false);
      expect(again.url).toBe(h.url);
      expect(lines.some((l) => l.includes("reusing it"))).toBe(true);
    } finally {
      await h.stop();
    }
    expect(h.running()).toBe(false);
    expect((await redisAnswers(h.url, 500)).ok).toBe(false);
  });

  it("keeps no files for tests", async () => {
    const dataDir = scratchDir();
    const h = await ensureEmbeddedRedis({ dataDir, port: await freePort(), persistent: false, log: () => {} });
    try {
      expect(await config(h.url, "appendonly")).toBe("no");
      expect(await config(h.url, "save")).toBe("");
    } finally {
      await h.stop();
    }
    expect(existsSync(resolve(dataDir, "appendonlydir"))).toBe(false);
  });

  it("refuses a port another program holds, or takes a free one for tests", async () => {
    const other = new URL(testRedisUrl()); // the test Redis: another program's port here
    const taken = Number(other.port);
    await expect(ensureEmbeddedRedis({ dataDir: scratchDir(), port: taken, persistent: true, log: () => {} })).rejects.toThrow(
      `Port ${taken} on 127.0.0.1 is taken by another program: set REDIS_PORT to a free port`,
    );
    const h = await ensureEmbeddedRedis({ dataDir: scratchDir(), port: taken, persistent: false, portFallback: true, log: () => {} });
    try {
      expect(h.url).not.toBe(`redis://127.0.0.1:${taken}`);
      expect((await redisAnswers(h.url)).ok).toBe(true);
    } finally {
      await h.stop();
    }
  });

  it("derives the test port from DB_TEST_PORT unless REDIS_TEST_PORT is set", () => {
    expect(testRedisPort({ DB_TEST_PORT: "3357" })).toBe(6357);
    expect(testRedisPort({ DB_TEST_PORT: "3357", REDIS_TEST_PORT: "7001" })).toBe(7001);
    expect(testRedisPort({})).toBe(6317);
    expect(() => testRedisPort({ REDIS_TEST_PORT: "seven" })).toThrow('REDIS_TEST_PORT must be a port number from 1 to 65535 (got "seven")');
  });

  it("prints the install command when redis-server is missing and the user is not root", () => {
    expect(() => ensureRedisInstalled(() => {}, () => null, false)).toThrow(ConfigProblem);
    expect(() => ensureRedisInstalled(() => {}, () => null, false)).toThrow("Install it with: sudo apt-get install -y redis-server");
    expect(ensureRedisInstalled(() => {}, () => "/usr/bin/redis-server", false)).toBe("/usr/bin/redis-server");
  });
});

describe("REDIS_URL", () => {
  const saved = process.env.REDIS_URL;
  afterAll(() => {
    if (saved === undefined) delete process.env.REDIS_URL;
    else process.env.REDIS_URL = saved;
  });

  it("is used as it is: nothing started, nothing stopped", async () => {
    process.env.REDIS_URL = testRedisUrl();
    const h = await ensureRedis("app");
    expect(h.startedHere).toBe(false);
    expect(h.url).toBe(testRedisUrl());
    expect(h.dataDir).toBeNull();
    await h.stop();
    expect((await redisAnswers(testRedisUrl())).ok).toBe(true);
  });

  it("that does not answer, or is not a Redis URL, stops start-up with one sentence", async () => {
    const port = await freePort();
    process.env.REDIS_URL = `redis://127.0.0.1:${port}`;
    await expect(ensureRedis("app")).rejects.toThrow(`Cannot use the Redis named by REDIS_URL (127.0.0.1:${port})`);
    process.env.REDIS_URL = "http://example.org";
    await expect(ensureRedis("app")).rejects.toThrow("REDIS_URL must start with redis:// or rediss:// (it starts with http://)");
    process.env.REDIS_URL = "not a url";
    await expect(ensureRedis("app")).rejects.toThrow("REDIS_URL is not a valid URL");
  });
});

describe("queue health check", () => {
  const saved = process.env.REDIS_URL;
  afterAll(async () => {
    if (saved === undefined) delete process.env.REDIS_URL;
    else process.env.REDIS_URL = saved;
    await closeQueues();
  });

  it("answers null with Redis up and a reason, within its time limit, with Redis down", async () => {
    process.env.REDIS_URL = testRedisUrl();
    expect(await queueProblem(2000)).toBeNull();
    await closeQueues();
    process.env.REDIS_URL = `redis://127.0.0.1:${await freePort()}`;
    const t0 = Date.now();
    expect(await queueProblem(500)).toMatch(/.+/);
    expect(Date.now() - t0).toBeLessThan(3000);
  });
});
