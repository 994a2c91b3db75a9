/**
 * Mail the local catcher stored for the app under test (MAIL_CATCHER_DIR), read from disk:
 * browser tests need the links in it, and the mailbox page is for admins only.
 */
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";

export interface CaughtMail {
  to: string[];
  subject: string;
  text: string;
}

/** The newest caught message to `to` with `subject`, waiting up to `timeoutMs` for it. */
export async function caughtMail(to: string, subject: string, timeoutMs = 10_000): Promise<CaughtMail> {
  const dir = process.env.MAIL_CATCHER_DIR;
  if (!dir) throw new Error("MAIL_CATCHER_DIR is not set: run the browser tests through npm test.");
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (existsSync(dir)) {
      const files = readdirSync(dir).filter((f) => f.endsWith(".json")).sort().reverse();
      for (const f of files) {
        try {
          const m = JSON.parse(readFileSync(join(dir, f), "utf8")) as CaughtMail;
          if (m.subject === subject && m.to.some((t) => t.toLowerCase() === to.toLowerCase())) return m;
        } catch {
          // Half written: read again on the next pass.
        }
      }
    }
    if (Date.now() > deadline) throw new Error(`No mail "${subject}" to ${to} within ${timeoutMs} ms.`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The first link in a caught message whose address contains `pathPart`. */
export function linkIn(mail: CaughtMail, pathPart: string): string {
  const link = mail.text.match(/https?:\/\/[^\s<>"]+/g)?.find((u) => u.includes(pathPart));
  if (!link) throw new Error(`No ${pathPart} link in "${mail.subject}".`);
  return link;
}
