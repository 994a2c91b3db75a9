/**
 * The development mailbox: reads the messages the local catcher stored as JSON in
 * MAIL_CATCHER_DIR. Available only when DEV_MAILBOX=1 (set by `npm start` and
 * `npm test` when they run the catcher) or in development mode; 404 otherwise.
 */
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";

export interface MailboxMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
}

export function mailboxEnabled(): boolean {
  if (process.env.DEV_MAILBOX === "1") return true;
  return process.env.NODE_ENV === "development" && !!process.env.MAIL_CATCHER_DIR;
}

export function listMailbox(limit = 100): MailboxMessage[] {
  const dir = process.env.MAIL_CATCHER_DIR;
  if (!dir || !existsSync(dir)) return [];
  const files = readdirSync(dir)
    .filter((f) => f.endsWith(".json"))
    .sort()
    .reverse()
    .slice(0, limit);
  const out: MailboxMessage[] = [];
  for (const f of files) {
    try {
      out.push(JSON.parse(readFileSync(join(dir, f), "utf8")) as MailboxMessage);
    } catch {
      // A half-written file: it will be readable on the next visit.
    }
  }
  return out;
}
