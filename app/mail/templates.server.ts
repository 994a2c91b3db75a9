/**
 * The messages Saddlebook sends: plain text first (readable in any client), plus a
 * simple HTML version in the app's colours (ink and copper) with the link as a button.
 */
import type { OutgoingMail } from "./transport.server";

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

function hours(h: number): string {
  if (h % 24 === 0 && h >= 48) return `${h / 24} days`;
  return h === 1 ? "1 hour" : `${h} hours`;
}

interface Layout {
  to: string;
  subject: string;
  greeting: string;
  paragraphs: string[];
  action: { label: string; url: string };
  after: string[];
}

function render(l: Layout): OutgoingMail {
  const text = [
    l.greeting,
    "",
    ...l.paragraphs.flatMap((p) => [p, ""]),
    `${l.action.label}:`,
    l.action.url,
    "",
    ...l.after.flatMap((p) => [p, ""]),
    "— Saddlebook",
  ].join("\n");
  const html = `<!doctype html>
<html><body style="margin:0;background:#f4f6f8;font-family:'Noto Sans',Arial,sans-serif;color:#223040">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0"><tr><td align="center" style="padding:24px 12px">
<table role="presentation" width="560" cellpadding="0" cellspacing="0" style="background:#ffffff;border:1px solid #d7dee5;border-radius:8px">
<tr><td style="background:#223040;border-radius:8px 8px 0 0;padding:14px 24px;color:#ffffff;font-size:18px;font-weight:600">Saddle<span style="color:#e2a676">book</span></td></tr>
<tr><td style="padding:24px;font-size:15px;line-height:1.5">
<p style="margin:0 0 14px">${escapeHtml(l.greeting)}</p>
${l.paragraphs.map((p) => `<p style="margin:0 0 14px">${escapeHtml(p)}</p>`).join("\n")}
<p style="margin:20px 0"><a href="${escapeHtml(l.action.url)}" style="background:#b8652f;color:#ffffff;text-decoration:none;padding:10px 18px;border-radius:6px;font-weight:600;display:inline-block">${escapeHtml(l.action.label)}</a></p>
<p style="margin:0 0 14px;font-size:13px;color:#55667a">If the button does not work, copy this address into your browser:<br><span style="word-break:break-all">${escapeHtml(l.action.url)}</span></p>
${l.after.map((p) => `<p style="margin:0 0 14px;font-size:13px;color:#55667a">${escapeHtml(p)}</p>`).join("\n")}
</td></tr></table></td></tr></table>
</body></html>`;
  return { to: l.to, subject: l.subject, text, html };
}

export function verificationMail(to: string, name: string, url: string, lifetimeHours: number): OutgoingMail {
  return render({
    to,
    subject: "Confirm your e-mail address for Saddlebook",
    greeting: `Hello ${name},`,
    paragraphs: ["Someone (we hope you) created a Saddlebook account with this address. Confirm it to start signing in."],
    action: { label: "Confirm e-mail address", url },
    after: [`The link works once and expires in ${hours(lifetimeHours)}.`, "If you did not create this account, ignore this message; nothing happens without the link."],
  });
}

export function passwordResetMail(to: string, name: string, url: string, lifetimeHours: number): OutgoingMail {
  return render({
    to,
    subject: "Set a new Saddlebook password",
    greeting: `Hello ${name},`,
    paragraphs: ["A new password was requested for your Saddlebook account. Choose one through this link."],
    action: { label: "Choose a new password", url },
    after: [
      `The link works once and expires in ${hours(lifetimeHours)}.`,
      "If you did not ask for this, ignore this message: your password stays as it is.",
    ],
  });
}

export function invitationMail(to: string, inviter: string, groupName: string, url: string, lifetimeHours: number): OutgoingMail {
  return render({
    to,
    subject: `${inviter} invites you to ${groupName} on Saddlebook`,
    greeting: "Hello,",
    paragraphs: [
      `${inviter} invites you to join the group "${groupName}" on Saddlebook, where the group keeps its elementary steps, mechanisms and simulation runs.`,
    ],
    action: { label: "Accept the invitation", url },
    after: [`The invitation works once and expires in ${hours(lifetimeHours)}.`, "If you were not expecting it, ignore this message."],
  });
}

export type ReviewOutcome = "approve" | "request_changes";

/** To the author of a proposed step: a curator approved it or sent it back, with their note. */
export function reviewOutcomeMail(to: string, name: string, r: { stepLabel: string; outcome: ReviewOutcome; reviewer: string; note?: string | null; url: string }): OutgoingMail {
  const approved = r.outcome === "approve";
  return render({
    to,
    subject: approved ? `Approved for the library: ${r.stepLabel}` : `Changes requested: ${r.stepLabel}`,
    greeting: `Hello ${name},`,
    paragraphs: [
      approved
        ? `${r.reviewer} approved your proposed step "${r.stepLabel}". It is now part of the shared library.`
        : `${r.reviewer} sent your proposed step "${r.stepLabel}" back with a request for changes. It is a draft again: edit it and propose it once more.`,
      ...(r.note ? [`Note from ${r.reviewer}: ${r.note}`] : []),
    ],
    action: { label: "Open the step", url: r.url },
    after: ["You receive this because you proposed the step for the shared library."],
  });
}
