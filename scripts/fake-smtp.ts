/**
 * The local mail catcher for development and tests: an SMTP server (smtp-server) on a
 * free 127.0.0.1 port that accepts every message and stores it as JSON in a folder
 * (.data/mail/<run>/), where the app's development mailbox page reads it. Nothing is
 * delivered anywhere.
 */
import { SMTPServer } from "smtp-server";
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { randomBytes } from "node:crypto";

export interface CaughtMail {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
}

// ------------------------------------------------------------ a small MIME reader
// Enough of RFC 2045/2046/2047 for what nodemailer sends: headers with folding,
// multipart bodies, quoted-printable and base64 parts, UTF-8 encoded words.

function splitHeadBody(raw: string): [string, string] {
  const i = raw.search(/\r?\n\r?\n/);
  if (i < 0) return [raw, ""];
  const sep = raw.slice(i).startsWith("\r\n\r\n") ? 4 : 2;
  return [raw.slice(0, i), raw.slice(i + sep)];
}

function parseHeaders(head: string): Map<string, string> {
  const map = new Map<string, string>();
  const unfolded = head.replace(/\r?\n[ \t]+/g, " ");
  for (const line of unfolded.split(/\r?\n/)) {
    const c = line.indexOf(":");
    if (c > 0) map.set(line.slice(0, c).trim().toLowerCase(), line.slice(c + 1).trim());
  }
  return map;
}

function param(value: string, name: string): string | null {
  const m = new RegExp(`${name}="?([^";]+)"?`, "i").exec(value);
  return m ? m[1] : null;
}

function decodeQP(s: string): Buffer {
  const soft = s.replace(/=\r?\n/g, "");
  const bytes: number[] = [];
  for (let i = 0; i < soft.length; i++) {
    const ch = soft[i];
    if (ch === "=" && /^[0-9A-Fa-f]{2}$/.test(soft.slice(i + 1, i + 3))) {
      bytes.push(parseInt(soft.slice(i + 1, i + 3), 16));
      i += 2;
    } else {
      bytes.push(...Buffer.from(ch, "utf8"));
    }
  }
  return Buffer.from(bytes);
}

export function decodeWords(s: string): string {
  return s
    .replace(/\?=\s+=\?/g, "?==?")
    .replace(/=\?([^?]+)\?([bBqQ])\?([^?]*)\?=/g, (_m, _cs: string, enc: string, text: string) =>
      enc.toUpperCase() === "B" ? Buffer.from(text, "base64").toString("utf8") : decodeQP(text.replace(/_/g, " ")).toString("utf8"),
    );
}

function decodeBody(body: string, encoding: string | undefined): string {
  const e = (encoding ?? "7bit").toLowerCase();
  if (e === "base64") return Buffer.from(body.replace(/\s+/g, ""), "base64").toString("utf8");
  if (e === "quoted-printable") return decodeQP(body).toString("utf8");
  return body;
}

function walk(raw: string, out: { text: string; html: string }): Map<string, string> {
  const [head, body] = splitHeadBody(raw);
  const h = parseHeaders(head);
  const type = h.get("content-type") ?? "text/plain";
  if (/^multipart\//i.test(type)) {
    const boundary = param(type, "boundary");
    if (boundary) {
      const parts = body.split(`--${boundary}`).slice(1);
      for (const p of parts) {
        if (p.startsWith("--")) break;
        walk(p.replace(/^\r?\n/, ""), out);
      }
    }
  } else if (/^text\/html/i.test(type)) {
    out.html ||= decodeBody(body, h.get("content-transfer-encoding"));
  } else if (/^text\//i.test(type)) {
    out.text ||= decodeBody(body, h.get("content-transfer-encoding"));
  }
  return h;
}

export function parseMessage(raw: string, envelope: { from: string; to: string[] }): CaughtMail {
  const out = { text: "", html: "" };
  const h = walk(raw, out);
  return {
    id: `${Date.now()}-${randomBytes(4).toString("hex")}`,
    receivedAt: new Date().toISOString(),
    from: decodeWords(h.get("from") ?? envelope.from),
    to: envelope.to,
    subject: decodeWords(h.get("subject") ?? "(no subject)"),
    text: out.text.replace(/\r\n/g, "\n").trimEnd(),
    html: out.html,
  };
}

export interface FakeSmtp {
  port: number;
  dir: string;
  stop(): Promise<void>;
}

export async function startFakeSmtp(opts: { port: number; dir: string }): Promise<FakeSmtp> {
  mkdirSync(opts.dir, { recursive: true });
  const server = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    banner: "Saddlebook development mail catcher",
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("end", () => {
        try {
          const mail = parseMessage(Buffer.concat(chunks).toString("utf8"), {
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
            to: session.envelope.rcptTo.map((r) => r.address),
          });
          writeFileSync(join(opts.dir, `${mail.id}.json`), JSON.stringify(mail, null, 2));
          callback();
        } catch (e) {
          callback(e as Error);
        }
      });
    },
  });
  server.on("error", (e) => console.error("mail catcher:", e.message));
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  return {
    port: opts.port,
    dir: opts.dir,
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
