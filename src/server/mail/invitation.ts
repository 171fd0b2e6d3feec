import { escapeHtml, type OutgoingMail } from "./index";

/** The invitation e-mail: who invites, to which workspace, with which role, and the one link. */
export function invitationMail(input: {
  to: string;
  inviterName: string;
  workspaceName: string;
  roleLabel: string;
  link: string;
  expiresAt: Date;
}): OutgoingMail {
  const until = input.expiresAt.toUTCString().replace(/:\d\d GMT$/, " UTC");
  const subject = `${input.inviterName} invites you to ${input.workspaceName} on Triskel`;
  const text = [
    `${input.inviterName} invites you to join the group "${input.workspaceName}" on Triskel as ${input.roleLabel}.`,
    "",
    `Accept the invitation: ${input.link}`,
    "",
    `The link works once and until ${until}. If you did not expect this message, ignore it.`,
  ].join("\n");
  const html =
    `<!doctype html><html><body style="font-family:system-ui,sans-serif;background:#f6f4ee;color:#14212b;padding:24px">
<div style="max-width:520px;margin:auto;background:#ffffff;border-radius:14px;padding:28px">
<p style="font-size:13px;letter-spacing:.12em;text-transform:uppercase;color:#146657;margin:0">Triskel</p>
<h1 style="font-size:22px;margin:12px 0">Join ${escapeHtml(input.workspaceName)}</h1>
<p>${escapeHtml(input.inviterName)} invites you to the workspace <strong>${escapeHtml(input.workspaceName)}</strong> ` +
    `as <strong>${escapeHtml(input.roleLabel)}</strong>.</p>
<p><a href="${escapeHtml(input.link)}"` +
    ` style="display:inline-block;background:#146657;color:#ffffff;padding:10px 20px;border-radius:999px;text-decoration:none">Accept the invitation</a></p>
<p style="font-size:13px;color:#5b6b75">The link works once and until ${escapeHtml(until)}. If you did not expect this message, ignore it.</p>
</div></body></html>`;
  return { to: input.to, subject, text, html };
}
