// A small reader for the messages our own mailer (nodemailer) writes, so the fake SMTP server can file
// subject, addresses and bodies into the outbox without another dependency. Covers what RFC 5322 and
// MIME (RFC 2045–2047) messages from nodemailer use: folded headers, encoded words in headers, 7bit/8bit,
// quoted-printable and base64 bodies, nested multipart. Anything else is kept whole in the raw column.

export interface ParsedMessage {
  headers: Map<string, string>;
  subject: string;
  from: string | null;
  to: string | null;
  messageId: string | null;
  text: string | null;
  html: string | null;
}

interface Part {
  headers: Map<string, string>;
  body: Buffer;
}

function splitHeaderBlock(raw: Buffer): Part {
  const text = raw.toString('latin1'); // byte-preserving: bodies are decoded from bytes later
  const match = /\r?\n\r?\n/.exec(text);
  const headerText = match ? text.slice(0, match.index) : text;
  const bodyStart = match ? match.index + match[0].length : text.length;
  const headers = new Map<string, string>();
  for (const line of headerText.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon <= 0) continue;
    const name = line.slice(0, colon).trim().toLowerCase();
    if (!headers.has(name)) headers.set(name, line.slice(colon + 1).trim());
  }
  return { headers, body: Buffer.from(text.slice(bodyStart), 'latin1') };
}

function parameter(headerValue: string, name: string): string | null {
  const re = new RegExp(`;\\s*${name}\\s*=\\s*(?:"([^"]*)"|([^;\\s]+))`, 'i');
  const m = re.exec(headerValue);
  return m ? (m[1] ?? m[2] ?? null) : null;
}

function decodeCharset(bytes: Buffer, charset: string | null): string {
  try {
    return new TextDecoder(charset || 'utf-8').decode(bytes);
  } catch {
    return bytes.toString('utf8');
  }
}

function decodeQuotedPrintable(input: string): Buffer {
  const softBreaksRemoved = input.replace(/=\r?\n/g, '');
  const bytes: number[] = [];
  for (let i = 0; i < softBreaksRemoved.length; i++) {
    const c = softBreaksRemoved[i];
    const hex = softBreaksRemoved.slice(i + 1, i + 3);
    if (c === '=' && /^[0-9A-Fa-f]{2}$/.test(hex)) {
      bytes.push(parseInt(hex, 16));
      i += 2;
    } else {
      bytes.push(softBreaksRemoved.charCodeAt(i) & 0xff);
    }
  }
  return Buffer.from(bytes);
}

function decodeBody(part: Part): string {
  const encoding = (part.headers.get('content-transfer-encoding') || '7bit').toLowerCase();
  const charset = parameter(part.headers.get('content-type') || '', 'charset');
  let bytes = part.body;
  if (encoding === 'base64') bytes = Buffer.from(part.body.toString('latin1').replace(/\s+/g, ''), 'base64');
  else if (encoding === 'quoted-printable') bytes = decodeQuotedPrintable(part.body.toString('latin1'));
  // Lines travel as CRLF (RFC 5322 §2.1); stored text uses plain newlines.
  return decodeCharset(bytes, charset).replace(/\r\n/g, '\n');
}

const ENCODED_WORD = /=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g;

/** RFC 2047 encoded words, e.g. =?UTF-8?Q?Einladung_f=C3=BCr?= and =?UTF-8?B?...?=. */
export function decodeEncodedWords(value: string): string {
  // Whitespace between two adjacent encoded words is not part of the text (RFC 2047 §6.2).
  const joined = value.replace(/(\?=)\s+(?==\?[^?]+\?[BbQq]\?)/g, '$1');
  return joined.replace(ENCODED_WORD, (_m, charset: string, kind: string, payload: string) => {
    const bytes =
      kind.toUpperCase() === 'B' ? Buffer.from(payload, 'base64') : decodeQuotedPrintable(payload.replace(/_/g, ' '));
    return decodeCharset(bytes, charset);
  });
}

function walk(part: Part, found: { text: string | null; html: string | null }): void {
  const contentType = part.headers.get('content-type') || 'text/plain';
  const mediaType = contentType.split(';')[0].trim().toLowerCase();
  if (mediaType.startsWith('multipart/')) {
    const boundary = parameter(contentType, 'boundary');
    if (!boundary) return;
    const body = part.body.toString('latin1');
    const delimiter = `--${boundary}`;
    const sections = body.split(delimiter).slice(1); // the preamble before the first delimiter is ignored
    for (const section of sections) {
      if (section.startsWith('--')) break; // closing delimiter
      const content = section.replace(/^\r?\n/, '').replace(/\r?\n$/, '');
      walk(splitHeaderBlock(Buffer.from(content, 'latin1')), found);
    }
    return;
  }
  const disposition = (part.headers.get('content-disposition') || '').toLowerCase();
  if (disposition.startsWith('attachment')) return;
  if (mediaType === 'text/plain' && found.text === null) found.text = decodeBody(part);
  else if (mediaType === 'text/html' && found.html === null) found.html = decodeBody(part);
}

export function parseMessage(raw: Buffer | string): ParsedMessage {
  const root = splitHeaderBlock(typeof raw === 'string' ? Buffer.from(raw, 'utf8') : raw);
  const header = (name: string) => {
    const v = root.headers.get(name);
    return v === undefined ? null : decodeEncodedWords(decodeCharset(Buffer.from(v, 'latin1'), 'utf-8'));
  };
  const found = { text: null as string | null, html: null as string | null };
  walk(root, found);
  return {
    headers: root.headers,
    subject: header('subject') ?? '',
    from: header('from'),
    to: header('to'),
    messageId: root.headers.get('message-id') ?? null,
    text: found.text,
    html: found.html,
  };
}
