// The wording of the notification mails: review requested and decided, and upstream changed (pin notices to
// controller project members are worded in pin-notices.ts on the same layout). Plain text first (it is what
// Admin › Mail shows), with an HTML alternative carrying the same words, like the account mails in
// lib/mail/templates.ts.
import { escapeHtml, type MailContent } from '@/lib/mail/templates';

/** Paragraphs, an optional quoted text (note, comment), then the link and the footer. */
export function renderNotice(
  subject: string,
  paragraphs: string[],
  quote: { who: string; text: string } | null,
  link: { url: string; label: string },
  footer: string,
): MailContent {
  const quoted = quote ? [`${quote.who} wrote:`, quote.text.split('\n').map((l) => `> ${l}`).join('\n')] : [];
  const text = [...paragraphs, ...quoted, `${link.label}: ${link.url}`, footer].join('\n\n') + '\n';
  const html =
    [
      ...paragraphs.map((p) => `<p>${escapeHtml(p).replace(/\n/g, '<br>')}</p>`),
      ...(quote
        ? [`<p>${escapeHtml(quote.who)} wrote:</p>`, `<blockquote>${escapeHtml(quote.text).replace(/\n/g, '<br>')}</blockquote>`]
        : []),
      `<p><a href="${escapeHtml(link.url)}">${escapeHtml(link.label)}</a></p>`,
      `<p><small>${escapeHtml(footer)}</small></p>`,
    ].join('\n') + '\n';
  return { subject, text, html };
}

const FOOTER = 'You receive this because of your notification settings; change them on your Modeshelf profile page.';

export interface VersionMention {
  /** e.g. "Furnace zone 2 thermal, order 12" */
  reducedModelName: string;
  number: number;
  url: string;
}

/** A mail about a version in review: its paragraphs, the quoted note or comment, and the link to its review sheet. */
function reviewNotice(subject: string, paragraphs: string[], quote: { who: string; text: string }, v: VersionMention): MailContent {
  return renderNotice(subject, paragraphs, quote, { url: v.url, label: 'Open the review' }, FOOTER);
}

export function reviewRequestedMail(input: { recipientName: string; version: VersionMention; authorName: string; note: string }): MailContent {
  const v = input.version;
  return reviewNotice(
    `Review requested: ${v.reducedModelName} v${v.number}`,
    [
      `Hello ${input.recipientName}, ${input.authorName} has submitted version ${v.number} of the reduced model "${v.reducedModelName}" for review.`,
      'Compare it with its source model, then approve it or send it back for revision with a comment. You cannot decide on a version you authored.',
    ],
    { who: input.authorName, text: input.note },
    v,
  );
}

export function reviewDecidedMail(input: {
  recipientName: string;
  version: VersionMention;
  reviewerName: string;
  decision: 'approved' | 'revise';
  comment: string;
}): MailContent {
  const v = input.version;
  const approved = input.decision === 'approved';
  return reviewNotice(
    approved ? `Approved: ${v.reducedModelName} v${v.number}` : `Sent back for revision: ${v.reducedModelName} v${v.number}`,
    [
      approved
        ? `Hello ${input.recipientName}, ${input.reviewerName} has approved version ${v.number} of "${v.reducedModelName}". Controller projects can now pin it.`
        : `Hello ${input.recipientName}, ${input.reviewerName} has sent version ${v.number} of "${v.reducedModelName}" back for revision. Make a new draft version that answers the comment, and submit that.`,
    ],
    { who: input.reviewerName, text: input.comment },
    v,
  );
}

export function upstreamChangedMail(input: {
  recipientName: string;
  sourceModelName: string;
  newNumber: number;
  uploaderName: string;
  derived: { reducedModelName: string; number: number; sourceNumber: number }[];
  url: string;
}): MailContent {
  const list = input.derived.map((d) => `${d.reducedModelName} v${d.number} (reduced from v${d.sourceNumber})`).join('; ');
  return renderNotice(
    `Upstream changed: ${input.sourceModelName} has version ${input.newNumber}`,
    [
      `Hello ${input.recipientName}, ${input.uploaderName} has registered version ${input.newNumber} of the source model "${input.sourceModelName}".`,
      `These reduced model versions of yours were reduced from an older version: ${list}. Re-run their recipe on the new version and compare the accuracy, old against new, before controller projects move on.`,
    ],
    null,
    { url: input.url, label: 'See the lineage' },
    FOOTER,
  );
}

