// What the fake SMTP server files into the outbox from a message our mailer (nodemailer) wrote: the subject,
// From and To as display text, the Message-ID, and the plain-text and HTML bodies. mailparser (the reader of
// nodemailer's family) does the reading: folded headers, RFC 2047 encoded words, 7bit/8bit, quoted-printable
// and base64 bodies, nested multiparts; attachments are not bodies. The raw message is kept beside these.
import { simpleParser, type AddressObject } from 'mailparser';

export interface ParsedMessage {
  subject: string;
  from: string | null;
  to: string | null;
  messageId: string | null;
  /** The text/plain body; null when the message has none (an HTML-only body is not turned into text). */
  text: string | null;
  html: string | null;
}

/** Characters that make a display name need quotes (RFC 5322 §3.2.3 "specials"). */
const SPECIALS = /[()<>[\]:;@\\,."]/;

function displayName(name: string): string {
  return SPECIALS.test(name) ? `"${name.replace(/(["\\])/g, '\\$1')}"` : name;
}

/** `Name <address>, other@example` as people read it: the name unquoted unless it needs quotes. */
function addressText(field: AddressObject | AddressObject[] | undefined): string | null {
  if (!field) return null;
  const mailboxes = (Array.isArray(field) ? field : [field]).flatMap((f) => f.value);
  if (mailboxes.length === 0) return null;
  return mailboxes
    .map((m) => {
      if (m.name && m.address) return `${displayName(m.name)} <${m.address}>`;
      return m.address || m.name;
    })
    .join(', ');
}

export async function parseMessage(raw: Buffer | string): Promise<ParsedMessage> {
  const mail = await simpleParser(raw, { skipHtmlToText: true, skipTextToHtml: true, skipTextLinks: true, skipImageLinks: true });
  return {
    subject: mail.subject ?? '',
    from: addressText(mail.from),
    to: addressText(mail.to),
    messageId: mail.messageId ?? null,
    text: mail.text ? mail.text : null,
    html: typeof mail.html === 'string' ? mail.html : null,
  };
}
