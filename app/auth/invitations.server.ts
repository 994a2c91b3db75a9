/** Group invitations: create and mail an expiring one-time link. */
import type { Knex } from "knex";
import { issueOneTimeToken, LINK_LIFETIME_HOURS } from "../../db/access/tokens.server";
import { createInvitation, type GroupRole } from "../../db/access/groups.server";
import { audit } from "../../db/access/audit.server";
import { sendMail } from "../mail/transport.server";
import { invitationMail } from "../mail/templates.server";
import { appUrl } from "./links.server";

export async function inviteToGroup(
  db: Knex,
  request: Request,
  inv: { group: { id: number; name: string }; email: string; groupRole: GroupRole; role: "viewer" | "author"; inviter: { id: number; name: string }; ip: string },
): Promise<number> {
  return db.transaction(async (trx) => {
    const expiresAt = new Date(Date.now() + LINK_LIFETIME_HOURS.invitation * 3600_000);
    const id = await createInvitation(trx, { groupId: inv.group.id, email: inv.email, groupRole: inv.groupRole, role: inv.role, invitedBy: inv.inviter.id, expiresAt });
    const { token } = await issueOneTimeToken(trx, { purpose: "invitation", invitationId: id, email: inv.email });
    await audit(trx, {
      userId: inv.inviter.id,
      action: "invitation.create",
      objectType: "group",
      objectId: inv.group.id,
      detail: { invitationId: id, email: inv.email, groupRole: inv.groupRole, role: inv.role },
      ip: inv.ip,
    });
    // Sent last: if the mail fails, the transaction rolls back and no dead invitation remains.
    await sendMail(invitationMail(inv.email, inv.inviter.name, inv.group.name, `${appUrl(request)}/invitations/accept?token=${encodeURIComponent(token)}`, LINK_LIFETIME_HOURS.invitation));
    return id;
  });
}
