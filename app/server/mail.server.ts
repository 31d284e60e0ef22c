import nodemailer, { type Transporter } from "nodemailer";
import { env } from "./env.server";

// One SMTP transport; in development and tests SMTP_URL points at the local catcher.
const globalForMail = globalThis as unknown as { __rakelineMail?: Transporter };
const transport = (globalForMail.__rakelineMail ??= nodemailer.createTransport(env.SMTP_URL));

export type OutgoingMail = { to: string; subject: string; text: string; html: string };

export async function sendMail(mail: OutgoingMail): Promise<void> {
  await transport.sendMail({ from: env.MAIL_FROM, ...mail });
}

function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

type Body = { greeting: string; paragraphs: string[]; action: string; url: string; footer: string };

function render({ greeting, paragraphs, action, url, footer }: Body): { text: string; html: string } {
  const text = [greeting, "", ...paragraphs.flatMap((p) => [p, ""]), `${action}: ${url}`, "", footer, "", "— Rakeline"].join("\n");
  const html = `<!doctype html><html><body style="font-family:system-ui,-apple-system,'Segoe UI',Roboto,Arial,sans-serif;color:#16181d;line-height:1.55;max-width:560px">
<p>${escapeHtml(greeting)}</p>
${paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join("\n")}
<p><a href="${escapeHtml(url)}" style="display:inline-block;background:#3a4fb8;color:#ffffff;padding:8px 14px;border-radius:4px;text-decoration:none">${escapeHtml(action)}</a></p>
<p style="font-size:13px;color:#474c57">If the button does not work, copy this address into your browser:<br><span style="font-family:monospace">${escapeHtml(url)}</span></p>
<p style="font-size:13px;color:#6b7180">${escapeHtml(footer)}</p>
<p style="font-size:13px;color:#6b7180">— Rakeline</p>
</body></html>`;
  return { text, html };
}

export function verificationMail(to: string, name: string, url: string): OutgoingMail {
  return {
    to,
    subject: "Confirm your e-mail address for Rakeline",
    ...render({
      greeting: `Hello ${name},`,
      paragraphs: ["Please confirm this e-mail address to finish setting up your Rakeline account. The link is valid for 24 hours."],
      action: "Confirm e-mail address",
      url,
      footer: "If you did not create a Rakeline account, you can ignore this message; nothing will be set up.",
    }),
  };
}

export function passwordResetMail(to: string, name: string, url: string): OutgoingMail {
  return {
    to,
    subject: "Reset your Rakeline password",
    ...render({
      greeting: `Hello ${name},`,
      paragraphs: ["Someone asked to reset the password of your Rakeline account. Choose a new password with the link below; it is valid for one hour and works once."],
      action: "Choose a new password",
      url,
      footer: "If you did not ask for this, ignore this message; your password stays as it is.",
    }),
  };
}

export function invitationMail(to: string, inviterName: string, teamName: string, roleLabel: string, url: string): OutgoingMail {
  return {
    to,
    subject: `${inviterName} invited you to ${teamName} on Rakeline`,
    ...render({
      greeting: "Hello,",
      paragraphs: [
        `${inviterName} invited you to join the team ${teamName} on Rakeline as ${roleLabel}.`,
        "Rakeline turns data-logger exports into aero balance and understeer reports, stint by stint. Open the invitation to accept or decline it; if you have no account yet, you can create one on the way.",
      ],
      action: "Open the invitation",
      url,
      footer: "The invitation is valid for 7 days. If you were not expecting it, you can ignore this message.",
    }),
  };
}
