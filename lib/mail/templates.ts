// The wording of the mails Modeshelf sends. Plain text first (it is what the Mail page shows), with an
// HTML alternative carrying the same words.

export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function render(subject: string, paragraphs: string[], link: { url: string; label: string }): MailContent {
  const text = [...paragraphs.slice(0, 1), `${link.label}: ${link.url}`, ...paragraphs.slice(1)].join('\n\n') + '\n';
  const html =
    paragraphs
      .map((p, i) =>
        i === 0
          ? `<p>${escapeHtml(p)}</p>\n<p><a href="${escapeHtml(link.url)}">${escapeHtml(link.label)}</a></p>`
          : `<p>${escapeHtml(p)}</p>`,
      )
      .join('\n') + '\n';
  return { subject, text, html };
}

export function invitationMail(input: { name: string; inviterName: string; role: string; url: string; days: number }): MailContent {
  return render(
    'You are invited to Modeshelf',
    [
      `Hello ${input.name}, ${input.inviterName} has invited you to Modeshelf, your team's registry of reduced-order models, as ${input.role}.`,
      `The link works once and expires in ${input.days} days. If you were not expecting this, ignore the message.`,
    ],
    { url: input.url, label: 'Choose your password' },
  );
}

export function passwordResetMail(input: { name: string; url: string; minutes: number }): MailContent {
  return render(
    'Reset your Modeshelf password',
    [
      `Hello ${input.name}, someone asked to reset the password of your Modeshelf account.`,
      `The link works once and expires in ${input.minutes} minutes. If you did not ask for it, ignore this message; your password stays as it is.`,
    ],
    { url: input.url, label: 'Choose a new password' },
  );
}
