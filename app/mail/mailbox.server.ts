/**
 * The development mailbox: reads the messages the local catcher stored as JSON in
 * MAIL_CATCHER_DIR. Available only while the local stand-ins run (DEV_STANDINS=1: always in
 * development and tests, in the production server only when the setting says so), and then
 * only to an admin (the route checks); 404 otherwise.
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
  return process.env.DEV_STANDINS === "1" && !!process.env.MAIL_CATCHER_DIR;
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
