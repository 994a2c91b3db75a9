/**
 * The development mailbox: every message the local catcher received, newest first, with
 * links clickable. Answers 404 unless the local stand-ins run (DEV_STANDINS=1) and the
 * signed-in person is an admin: mail holds sign-in and reset links.
 */
import { data, Link } from "react-router";
import type { Route } from "./+types/dev.mailbox";
import { listMailbox, mailboxEnabled } from "~/mail/mailbox.server";
import { getOptionalUser } from "~/auth/current-user.server";
import { can } from "~/auth/policy.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Mailbox (development) · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  if (!mailboxEnabled()) throw data("Not found", { status: 404 });
  const user = await getOptionalUser(request);
  // The same answer for the signed-out and for non-admins: the page's existence is not told.
  if (!user || !can(user, { do: "user.manage" })) throw data("Not found", { status: 404 });
  const to = new URL(request.url).searchParams.get("to")?.toLowerCase() ?? "";
  const messages = listMailbox().filter((m) => !to || m.to.some((t) => t.toLowerCase() === to));
  return { messages, to };
}

/** Splits text into plain runs and http(s) links. */
function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <>
      {parts.map((p, i) =>
        /^https?:\/\//.test(p) ? (
          <a key={i} href={p} className="break-all text-copper-700 underline">
            {p}
          </a>
        ) : (
          <span key={i}>{p}</span>
        ),
      )}
    </>
  );
}

export default function Mailbox({ loaderData }: Route.ComponentProps) {
  return (
    <div className="mx-auto max-w-4xl space-y-4">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">Mailbox</h1>
        <p className="text-sm text-ink-600">
          Local stand-in, for admins: mail the app sends is caught locally and shown here; nothing is delivered.
          {loaderData.to && (
            <>
              {" "}
              Showing mail to <strong>{loaderData.to}</strong> · <Link className="text-copper-700 hover:underline" to="/dev/mailbox">all mail</Link>
            </>
          )}
        </p>
      </div>
      {loaderData.messages.length === 0 && <p className="panel text-sm text-ink-600">No mail yet.</p>}
      {loaderData.messages.map((m) => (
        <article key={m.id} className="panel" aria-label={m.subject}>
          <header className="border-b border-ink-100 pb-2">
            <h2 className="font-semibold">{m.subject}</h2>
            <p className="text-xs text-ink-500">
              To <span className="num">{m.to.join(", ")}</span> · from {m.from} · <span className="num">{m.receivedAt.replace("T", " ").slice(0, 19)} UTC</span>
            </p>
          </header>
          <pre className="mt-2 font-sans text-sm whitespace-pre-wrap text-ink-800">
            <Linkified text={m.text} />
          </pre>
          {m.html && (
            <details className="mt-2 text-sm">
              <summary className="cursor-pointer text-ink-600">HTML version</summary>
              <iframe title={`HTML version of ${m.subject}`} sandbox="" srcDoc={m.html} className="mt-2 h-96 w-full rounded border border-ink-200" />
            </details>
          )}
        </article>
      ))}
    </div>
  );
}
