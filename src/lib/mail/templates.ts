/** Plain-text and HTML bodies for the e-mail Quayside sends. Pure: no transport here. */

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html: string;
}

function escapeHtml(value: string): string {
  return value
    .replaceAll('&', '&amp;')
    .replaceAll('<', '&lt;')
    .replaceAll('>', '&gt;')
    .replaceAll('"', '&quot;');
}

/** Invitation to join a label's workspace; `acceptUrl` leads to the set-password page. */
export function renderInvitationMail(input: {
  to: string;
  organizationName: string;
  inviterName: string;
  role: string;
  acceptUrl: string;
  expiresAt: Date;
}): MailMessage {
  const expires = input.expiresAt.toISOString().slice(0, 10);
  const text = [
    `${input.inviterName} has invited you to ${input.organizationName} on Quayside as ${input.role}.`,
    '',
    `Accept the invitation and choose a password: ${input.acceptUrl}`,
    '',
    `The link works until ${expires}. If you did not expect this, ignore this message.`,
  ].join('\n');
  const html = `<p>${escapeHtml(input.inviterName)} has invited you to <strong>${escapeHtml(
    input.organizationName,
  )}</strong> on Quayside as <strong>${escapeHtml(input.role)}</strong>.</p>
<p><a href="${escapeHtml(input.acceptUrl)}">Accept the invitation and choose a password</a></p>
<p>The link works until ${expires}. If you did not expect this, ignore this message.</p>`;
  return {
    to: input.to,
    subject: `You are invited to ${input.organizationName} on Quayside`,
    text,
    html,
  };
}
