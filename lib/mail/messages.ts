import type { OutgoingMail } from "./transport";

const escapeHtml = (value: string) =>
  value.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

export function layout(paragraphs: string[], link: { href: string; label: string }): string {
  return [
    '<div style="font-family:system-ui,sans-serif;max-width:32rem;color:#0f2133">',
    '<p style="font-weight:600;color:#1f4c70">Spillway</p>',
    ...paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`),
    `<p><a href="${escapeHtml(link.href)}" style="background:#1f4c70;color:#fff;padding:8px 14px;border-radius:6px;text-decoration:none">${escapeHtml(link.label)}</a></p>`,
    `<p style="font-size:12px;color:#3578a8">Or paste this address into your browser: ${escapeHtml(link.href)}</p>`,
    "</div>",
  ].join("");
}

export function signInLinkMail(to: string, url: string): OutgoingMail {
  const intro = "Someone asked to sign in to Spillway with this e-mail address. The link works once and expires in 24 hours.";
  const ignore = "If that was not you, ignore this message; nothing changes.";
  return {
    to,
    kind: "sign-in-link",
    subject: "Your Spillway sign-in link",
    text: `${intro}\n\nSign in: ${url}\n\n${ignore}\n`,
    html: layout([intro, ignore], { href: url, label: "Sign in to Spillway" }),
  };
}

export function invitationMail(params: { to: string; url: string; workspaceId: string; workspaceName: string; role: string; invitedBy: string; expiresAt: Date }): OutgoingMail {
  const intro = `${params.invitedBy} invited you to the Spillway workspace "${params.workspaceName}" as ${params.role}.`;
  const expiry = `The invitation expires on ${params.expiresAt.toUTCString()}. Open it to choose a password and join.`;
  return {
    to: params.to,
    kind: "invitation",
    workspaceId: params.workspaceId,
    subject: `Invitation to ${params.workspaceName} on Spillway`,
    text: `${intro}\n${expiry}\n\nAccept: ${params.url}\n`,
    html: layout([intro, expiry], { href: params.url, label: "Accept the invitation" }),
  };
}
