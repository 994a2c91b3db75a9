/**
 * One worker of the production server (started by scripts/serve.ts through node:cluster; plain
 * JavaScript so that it runs the build on plain Node). It answers requests with React Router's
 * request listener on node:http, serves build/client's files itself (hashed assets cached for a
 * year, the rest for an hour; no disk access for any other path) and compresses text for
 * clients that accept it. On SIGTERM/SIGINT, or when its supervisor is gone, it stops accepting
 * connections, finishes the requests it holds (at most SHUTDOWN_GRACE_MS) and exits.
 * Requests reach the app through scripts/request-bridge.mjs (body limit, errors in JSON, nothing a
 * client sends can stop the process).
 */
import { readdirSync } from "node:fs";
import { createServer } from "node:http";
import { dirname, join, relative, resolve, sep } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import compression from "compression";
import serveStatic from "serve-static";
import { SHUTDOWN_GRACE_MS } from "./shutdown-grace.mjs";
import { createBridge, DEFAULT_MAX_BODY_BYTES } from "./request-bridge.mjs";

const root = resolve(dirname(fileURLToPath(import.meta.url)), "..");

/** Every file under `dir`, as URL paths ("/assets/x.js"). */
function clientFiles(dir) {
  const out = new Set();
  const walk = (d) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.isFile()) out.add("/" + relative(dir, p).split(sep).join("/"));
    }
  };
  walk(dir);
  return out;
}

function decodePath(s) {
  try {
    return decodeURIComponent(s);
  } catch {
    return s;
  }
}

const build = await import(pathToFileURL(join(root, "build/server/index.js")).href);
const clientDir = join(root, "build/client");
const assetsDir = join(clientDir, "assets") + sep;
const files = clientFiles(clientDir);
const maxBody = Number(process.env.MAX_REQUEST_BODY_BYTES || DEFAULT_MAX_BODY_BYTES);
const listener = createBridge({ build, maxBodyBytes: Number.isSafeInteger(maxBody) && maxBody > 0 ? maxBody : DEFAULT_MAX_BODY_BYTES });
const compress = compression();
const statics = serveStatic(clientDir, {
  index: false,
  redirect: false,
  setHeaders(res, path) {
    res.setHeader("Cache-Control", path.startsWith(assetsDir) ? "public, max-age=31536000, immutable" : "public, max-age=3600");
    res.setHeader("X-Content-Type-Options", "nosniff");
  },
});

const server = createServer((req, res) => {
  compress(req, res, () => {
    const url = req.url ?? "/";
    const q = url.indexOf("?");
    const path = q >= 0 ? url.slice(0, q) : url;
    if ((req.method === "GET" || req.method === "HEAD") && files.has(decodePath(path))) {
      statics(req, res, () => listener(req, res));
    } else {
      listener(req, res);
    }
  });
});
// Longer than a load balancer's idle timeout, as usual for keep-alive behind one (common practice).
server.keepAliveTimeout = 65_000;
server.headersTimeout = 66_000;
server.listen(Number(process.env.PORT ?? 3000), process.env.HOST ?? "127.0.0.1");

let closing = false;
function close() {
  if (closing) return;
  closing = true;
  server.close(() => process.exit(0));
  server.closeIdleConnections();
  setTimeout(() => process.exit(0), SHUTDOWN_GRACE_MS).unref();
}
process.once("SIGTERM", close);
process.once("SIGINT", close);
// The supervisor is gone (killed): stop too rather than serve unsupervised.
process.once("disconnect", close);
// A promise nobody awaited that failed: logged, never a reason to drop every connection held.
process.on("unhandledRejection", (e) => console.error(`Unhandled rejection: ${e instanceof Error ? e.stack ?? e.message : e}`));
