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

function simpleMail(
  to: string,
  subject: string,
  paragraphs: string[],
  link?: { url: string; label: string },
): MailMessage {
  const text = [...paragraphs, ...(link ? [`${link.label}: ${link.url}`] : [])].join('\n\n');
  const html = [
    ...paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`),
    ...(link ? [`<p><a href="${escapeHtml(link.url)}">${escapeHtml(link.label)}</a></p>`] : []),
  ].join('\n');
  return { to, subject, text, html };
}

/** To the label's engineers and coordinators when a check run finds failures. */
export function renderChecksFailedMail(input: {
  to: string;
  releaseTitle: string;
  failures: number;
  warnings: number;
  releaseUrl: string;
}): MailMessage {
  return simpleMail(
    input.to,
    `Checks failed: ${input.releaseTitle}`,
    [
      `The latest checks of “${input.releaseTitle}” found ${input.failures} failure${input.failures === 1 ? '' : 's'} and ${input.warnings} warning${input.warnings === 1 ? '' : 's'}.`,
      'Each finding names the track, the measured value and the limit.',
    ],
    { url: input.releaseUrl, label: 'Open the findings' },
  );
}

/** To coordinators when both sign-offs are in and nothing blocks approval. */
export function renderReadyForApprovalMail(input: {
  to: string;
  releaseTitle: string;
  releaseUrl: string;
}): MailMessage {
  return simpleMail(
    input.to,
    `Ready for approval: ${input.releaseTitle}`,
    [
      `“${input.releaseTitle}” has its audio and metadata signed off and no open findings. It is ready for your approval.`,
    ],
    { url: input.releaseUrl, label: 'Review and approve' },
  );
}

/** To each distributor the release is shared with, once its package is built. */
export function renderPackageReadyMail(input: {
  to: string;
  releaseTitle: string;
  labelName: string;
  version: number;
  deliveriesUrl: string;
}): MailMessage {
  return simpleMail(
    input.to,
    `Package ready: ${input.releaseTitle} (version ${input.version})`,
    [
      `${input.labelName} has approved “${input.releaseTitle}”. Package version ${input.version} is ready for you to download.`,
      'Downloads are logged. Once you have ingested it, acknowledge the delivery, or return it with a reason.',
    ],
    { url: input.deliveriesUrl, label: 'Open your deliveries' },
  );
}

/** To the label when a distributor returns a release. */
export function renderReturnedMail(input: {
  to: string;
  releaseTitle: string;
  distributorName: string;
  reason: string;
  releaseUrl: string;
}): MailMessage {
  return simpleMail(
    input.to,
    `Returned by distributor: ${input.releaseTitle}`,
    [
      `${input.distributorName} returned “${input.releaseTitle}” with this reason:`,
      input.reason,
      'The release is open again for changes; approving it again makes a new package version.',
    ],
    { url: input.releaseUrl, label: 'Open the release' },
  );
}
