/**
 * The production server's bridge between node:http and the built app's fetch handler: turns an
 * IncomingMessage into a fetch Request and writes the Response back. Plain JavaScript so that it
 * runs on plain Node in the worker processes (scripts/serve-worker.mjs).
 *
 * What a client can send never stops the process:
 *  - a body stream that a route stops reading (reader.cancel(), e.g. a JSON body over its 1 MB
 *    limit answered 413) stops taking chunks, and the rest of the upload is read and discarded
 *    (at most DRAIN_LIMIT_BYTES, then the connection is closed);
 *  - a body larger than the server-wide limit (declared in Content-Length or counted while it
 *    streams, chunked or not) is answered 413 in the API's JSON error shape at once, whatever
 *    the route would have done;
 *  - a request line or Host header that makes no URL is answered 400;
 *  - a route that throws is answered 500 in the JSON shape, and a client that goes away while the
 *    answer streams only ends that answer.
 * The body stream honours back-pressure: the socket is paused while the route is not reading.
 */
import { createRequestHandler } from "react-router";

/** Largest request body of any route (uploads included): 8 MiB unless MAX_REQUEST_BODY_BYTES says. */
export const DEFAULT_MAX_BODY_BYTES = 8 * 1024 * 1024;
/** After a route stops reading a body, at most this much more is read and discarded. */
const DRAIN_LIMIT_BYTES = 64 * 1024 * 1024;

class BodyTooLarge extends Error {}

/** A JSON error in the API's one shape, {"error":{"code","message"}}. */
function writeJsonError(res, status, code, message, extraHeaders = {}) {
  if (res.headersSent || res.destroyed) return;
  const body = JSON.stringify({ error: { code, message } });
  res.writeHead(status, {
    "Content-Type": "application/json; charset=utf-8",
    "Content-Length": Buffer.byteLength(body),
    "Cache-Control": "no-store",
    "X-Content-Type-Options": "nosniff",
    ...extraHeaders,
  });
  res.end(body);
}

function tooLargeMessage(limit) {
  return `The request body is larger than the server's limit of ${limit} bytes (${(limit / 1048576).toFixed(limit % 1048576 ? 1 : 0)} MiB).`;
}

/** After the answer is sent, an upload still coming is closed rather than read to its end. */
function closeWhenAnswered(req, res) {
  res.once("finish", () => {
    if (!req.complete) req.socket?.destroy();
  });
}

/**
 * Reads the rest of an abandoned upload and throws it away, so that a client still sending gets
 * to read the answer (closing the connection under it would reset its writes). Past
 * DRAIN_LIMIT_BYTES the connection is closed.
 */
function drain(req) {
  let drained = 0;
  req.removeAllListeners("data");
  req.on("data", (chunk) => {
    drained += chunk.length;
    if (drained > DRAIN_LIMIT_BYTES) req.socket?.destroy();
  });
  req.on("error", () => {});
  req.resume();
}

/**
 * The body of `req` as a ReadableStream: pull-based, cancellable, counted against `limit`;
 * `onOverLimit` is called once when the count passes it.
 */
function bodyStream(req, limit, onOverLimit) {
  let size = 0;
  let finished = false;
  let controller;
  const detach = () => {
    finished = true;
    req.off("data", onData);
    req.off("end", onEnd);
    req.off("error", onError);
  };
  const finish = (how, arg) => {
    if (finished) return;
    detach();
    try {
      if (how === "close") controller.close();
      else controller.error(arg);
    } catch {
      // Already closed by the reader: nothing to tell it.
    }
  };
  const onData = (chunk) => {
    if (finished) return;
    size += chunk.length;
    if (size > limit) {
      finish("error", new BodyTooLarge(tooLargeMessage(limit)));
      drain(req);
      onOverLimit();
      return;
    }
    try {
      controller.enqueue(new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength));
      if ((controller.desiredSize ?? 1) <= 0) req.pause();
    } catch {
      // The reader went away between chunks: stop taking them.
      finished = true;
      drain(req);
    }
  };
  const onEnd = () => finish("close");
  const onError = (e) => finish("error", e);
  return new ReadableStream(
    {
      start(c) {
        controller = c;
        req.on("data", onData);
        req.once("end", onEnd);
        req.once("error", onError);
      },
      pull() {
        if (!finished) req.resume();
      },
      cancel() {
        if (finished) return;
        detach();
        drain(req);
      },
    },
    { highWaterMark: 64 * 1024, size: (chunk) => chunk.byteLength },
  );
}

function requestUrl(req) {
  const host = req.headers.host ?? "127.0.0.1";
  const protocol = req.socket && req.socket.encrypted ? "https:" : "http:";
  return new URL(req.url ?? "/", `${protocol}//${host}`);
}

function headersOf(req) {
  const headers = new Headers();
  const raw = req.rawHeaders;
  for (let i = 0; i + 1 < raw.length; i += 2) {
    try {
      headers.append(raw[i], raw[i + 1]);
    } catch {
      // A header value fetch refuses (control characters): left out, as a proxy would.
    }
  }
  return headers;
}

async function writeBody(body, res) {
  const reader = body.getReader();
  try {
    for (;;) {
      if (res.destroyed) {
        await reader.cancel().catch(() => {});
        return;
      }
      const { done, value } = await reader.read();
      if (done) break;
      if (!res.write(value)) {
        await new Promise((resolve) => {
          const go = () => (res.off("drain", go), res.off("close", go), resolve());
          res.once("drain", go);
          res.once("close", go);
        });
      }
    }
    res.end();
  } catch {
    // The answer's own stream failed midway: end the connection; the headers are gone already.
    res.destroy();
  } finally {
    reader.releaseLock?.();
  }
}

/**
 * A node:http request listener for the built app.
 * @param {{ build: unknown, maxBodyBytes?: number, mode?: string }} opts
 * @returns {(req: import("node:http").IncomingMessage, res: import("node:http").ServerResponse) => void}
 */
export function createBridge({ build, maxBodyBytes = DEFAULT_MAX_BODY_BYTES, mode = "production" }) {
  const handle = createRequestHandler(build, mode);
  return (req, res) => {
    void answer(req, res).catch((e) => {
      console.error(`Request ${req.method} ${req.url}: ${e instanceof Error ? e.message : e}`);
      writeJsonError(res, 500, "internal_error", "The server could not answer this request.");
      if (!res.writableEnded) res.destroy();
    });
  };

  async function answer(req, res) {
    res.on("error", () => {});
    let url;
    try {
      url = requestUrl(req);
    } catch {
      req.resume();
      writeJsonError(res, 400, "bad_request", "The request's address or Host header is not valid.", { Connection: "close" });
      closeWhenAnswered(req, res);
      return;
    }
    const method = req.method ?? "GET";
    const hasBody = method !== "GET" && method !== "HEAD";
    const declared = Number(req.headers["content-length"]);
    if (hasBody && Number.isFinite(declared) && declared > maxBodyBytes) {
      if (declared > DRAIN_LIMIT_BYTES) {
        // Too much to read and throw away: answer and close.
        writeJsonError(res, 413, "body_too_large", tooLargeMessage(maxBodyBytes), { Connection: "close" });
        req.resume();
        closeWhenAnswered(req, res);
      } else {
        writeJsonError(res, 413, "body_too_large", tooLargeMessage(maxBodyBytes));
        drain(req);
      }
      return;
    }
    const abort = new AbortController();
    res.once("close", () => {
      if (!res.writableFinished) abort.abort();
    });
    let overLimit = false;
    const init = { method, headers: headersOf(req), signal: abort.signal };
    if (hasBody) {
      init.body = bodyStream(req, maxBodyBytes, () => {
        overLimit = true;
        writeJsonError(res, 413, "body_too_large", tooLargeMessage(maxBodyBytes));
      });
      init.duplex = "half";
    }
    let response;
    try {
      response = await handle(new Request(url, init));
    } catch (e) {
      if (overLimit || res.headersSent) return;
      console.error(`Request ${method} ${url.pathname}: ${e instanceof Error ? e.stack ?? e.message : e}`);
      writeJsonError(res, 500, "internal_error", "The server could not answer this request.");
      return;
    }
    if (overLimit || res.headersSent) {
      // The 413 went out while the route was still at work: its answer is not wanted.
      await response.body?.cancel().catch(() => {});
      return;
    }
    // Set-Cookie headers one by one (getSetCookie); iterating Headers would join them with commas.
    const headerList = [];
    for (const [k, v] of response.headers) if (k !== "set-cookie") headerList.push(k, v);
    for (const c of response.headers.getSetCookie()) headerList.push("Set-Cookie", c);
    if (response.statusText) res.writeHead(response.status, response.statusText, headerList);
    else res.writeHead(response.status, headerList);
    if (response.body && method !== "HEAD") await writeBody(response.body, res);
    else {
      await response.body?.cancel().catch(() => {});
      res.end();
    }
  }
}
