/** GET /verify-email?token=…: confirms the address once; an expired or used link says so. */
import { Link } from "react-router";
import type { Route } from "./+types/verify-email";
import { getDb } from "../../db/client.server";
import { consumeOneTimeToken, LINK_PROBLEM } from "../../db/access/tokens.server";
import { markEmailVerified } from "../../db/access/users.server";
import { audit } from "../../db/access/audit.server";
import { clientAddress } from "~/auth/client-address.server";
import { AuthCard, Notice } from "~/auth/ui/AuthCard";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Confirm e-mail · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const token = new URL(request.url).searchParams.get("token") ?? "";
  const db = getDb();
  return db.transaction(async (trx) => {
    const r = await consumeOneTimeToken(trx, "verify-email", token);
    if (!r.ok) return { ok: false as const, message: LINK_PROBLEM[r.reason] };
    if (r.token.userId != null) {
      await markEmailVerified(trx, r.token.userId);
      await audit(trx, { userId: r.token.userId, action: "user.verify-email", objectType: "user", objectId: r.token.userId, ip: clientAddress(request) });
    }
    return { ok: true as const, message: "Your e-mail address is confirmed." };
  });
}

export default function VerifyEmail({ loaderData }: Route.ComponentProps) {
  return (
    <AuthCard title="Confirm e-mail address">
      <Notice tone={loaderData.ok ? "ok" : "error"}>{loaderData.message}</Notice>
      {loaderData.ok ? (
        <Link className="btn-primary" to="/sign-in?notice=verified">
          Sign in
        </Link>
      ) : (
        <p className="text-sm text-ink-600">
          To get a new link, <Link className="text-copper-700 hover:underline" to="/sign-in">sign in</Link> with your e-mail and password and choose
          “Send the confirmation link again”.
        </p>
      )}
    </AuthCard>
  );
}
