// Plain-text and simple HTML bodies of every message the portal sends. Wording is Sumfold's own.

import { escapeHtml as esc } from "@/lib/html";

export interface MailContent {
  subject: string;
  text: string;
  html: string;
}


/** Builds a message from paragraphs and an optional call-to-action link. */
function compose(subject: string, paragraphs: string[], action?: { label: string; url: string }): MailContent {
  const text = [...paragraphs, ...(action ? [`${action.label}: ${action.url}`] : []), "— Sumfold"].join("\n\n");
  const html = `<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#17202e;max-width:36rem">
${paragraphs.map((p) => `<p>${esc(p)}</p>`).join("\n")}
${action ? `<p><a href="${esc(action.url)}" style="background:#147063;color:#fff;padding:8px 14px;border-radius:6px;text-decoration:none">${esc(action.label)}</a></p><p style="font-size:12px;color:#6b7787">Or paste this address into your browser: ${esc(action.url)}</p>` : ""}
<p style="color:#6b7787">— Sumfold</p></body></html>`;
  return { subject, text, html };
}

export const verifyEmailMail = (p: { name: string; url: string }) =>
  compose("Confirm your e-mail address for Sumfold", [`Hello ${p.name},`, "Confirm this address to finish setting up your Sumfold account. The link works once, for 24 hours."], {
    label: "Confirm my address",
    url: p.url,
  });

export const resetPasswordMail = (p: { name: string; url: string }) =>
  compose(
    "Choose a new Sumfold password",
    [`Hello ${p.name},`, "Someone asked to reset the password of this Sumfold account. If it was you, choose a new one below; the link works once, for 1 hour.", "If it was not you, ignore this message: your password stays as it is."],
    { label: "Choose a new password", url: p.url },
  );

export const invitationMail = (p: { organization: string; inviter: string; role: string; url: string; expiresAt: Date }) =>
  compose(
    `${p.inviter} invites you to ${p.organization} on Sumfold`,
    [
      `${p.inviter} has invited you to join ${p.organization} on Sumfold as ${p.role}.`,
      `The invitation works once and until ${p.expiresAt.toUTCString()}.`,
    ],
    { label: "Accept the invitation", url: p.url },
  );

type KeyEvent = "created" | "rotated" | "revoked" | "expires soon";

export const keyNoticeMail = (p: { organization: string; event: KeyEvent; label: string; prefix: string; actor: string; detail?: string; url: string }) =>
  compose(
    `[${p.organization}] API key "${p.label}" ${p.event}`,
    [
      `The API key "${p.label}" (${p.prefix}) of ${p.organization} ${p.event === "expires soon" ? "expires soon" : `was ${p.event} by ${p.actor}`}.`,
      ...(p.detail ? [p.detail] : []),
      "You receive this because you administer the organisation. If this change is unexpected, review the keys now.",
    ],
    { label: "Review the keys", url: p.url },
  );

export const quotaMail = (p: { organization: string; threshold: number; used: number; quota: number; month: string; url: string }) =>
  compose(
    `[${p.organization}] ${p.threshold}% of this month's compute units used`,
    [
      `${p.organization} has used ${p.used.toLocaleString("en-GB")} of its ${p.quota.toLocaleString("en-GB")} compute units for ${p.month} (${p.threshold}% or more).`,
      p.threshold >= 100
        ? "Further requests are refused with status 429 until the units renew on the first day of next month (UTC), or until the plan changes."
        : "Requests keep working; at 100% they are refused until the units renew on the first day of next month (UTC).",
    ],
    { label: "See the usage", url: p.url },
  );

export const receiptMail = (p: { organization: string; number: string; total: string; period: string; card: string; url: string }) =>
  compose(
    `[${p.organization}] Receipt for invoice ${p.number}`,
    [`We received ${p.total} for invoice ${p.number} (${p.period}), charged to ${p.card}.`, "The invoice and its PDF are in the portal."],
    { label: "View the invoice", url: p.url },
  );

export const paymentFailedMail = (p: { organization: string; number: string; total: string; graceDays: number; restrictOn: string; url: string }) =>
  compose(
    `[${p.organization}] Payment failed for invoice ${p.number}`,
    [
      `The payment of ${p.total} for invoice ${p.number} was declined, so the invoice is past due.`,
      `Update the card or pay the invoice within ${p.graceDays} days (by ${p.restrictOn}). After that, the organisation's API keys keep working but at the Free plan's limits until the invoice is paid; no data is removed.`,
    ],
    { label: "Pay the invoice", url: p.url },
  );

export const restrictedMail = (p: { organization: string; plan: string; url: string }) =>
  compose(
    `[${p.organization}] API limits lowered to the Free plan`,
    [
      `An invoice of ${p.organization} is still unpaid after the grace period, so the ${p.plan} plan's limits are suspended and the Free plan's limits apply. Keys, datasets and history are kept.`,
      "Paying the open invoice restores the plan within seconds.",
    ],
    { label: "Pay now", url: p.url },
  );

export const planChangeMail = (p: { organization: string; actor: string; from: string; to: string; when: string; charge?: string; url: string }) =>
  compose(
    `[${p.organization}] Plan change: ${p.from} → ${p.to}`,
    [
      `${p.actor} changed the plan of ${p.organization} from ${p.from} to ${p.to}, effective ${p.when}.`,
      ...(p.charge ? [`The prorated difference for the rest of this period, ${p.charge}, was charged at once.`] : []),
    ],
    { label: "Open billing", url: p.url },
  );

export const planRestoredMail = (p: { organization: string; plan: string; url: string }) =>
  compose(`[${p.organization}] ${p.plan} plan restored`, [`Thank you: the open invoices are paid and the ${p.plan} plan's limits apply again.`], { label: "Open billing", url: p.url });
