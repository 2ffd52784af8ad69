// lib/mail/mime.ts (over mailparser) reads what our mailer writes into the outbox's fields. The reference
// messages are composed by nodemailer's own MailComposer (the library that sends Modeshelf's mail), so the
// reader is checked against the real encoder rather than against hand-written MIME.
import { describe, expect, it } from 'vitest';
import MailComposer from 'nodemailer/lib/mail-composer';
import { parseMessage } from '@/lib/mail/mime';

function compose(mail: ConstructorParameters<typeof MailComposer>[0]): Promise<Buffer> {
  return new Promise((resolve, reject) =>
    new MailComposer(mail).compile().build((err, message) => (err ? reject(err) : resolve(message))),
  );
}

describe('parseMessage', () => {
  it('reads subject, addresses and both parts of a multipart/alternative message', async () => {
    const raw = await compose({
      from: 'Modeshelf <modeshelf@modeshelf.invalid>',
      to: 'Åsa Brännström <asa@quillmere.example>',
      subject: 'Ofenkurve für Prüfstand 7 — Freigabe',
      text: 'Zeile eins\nZeile zwei mit Ümlaut und einem sehr langen Satz, der über die Grenze von sechsundsiebzig Zeichen hinausgeht.\n',
      html: '<p>Zeile <b>eins</b> — ä</p>',
      messageId: '<kiln-7@quillmere.example>',
    });
    const parsed = await parseMessage(raw);
    expect(parsed.subject).toBe('Ofenkurve für Prüfstand 7 — Freigabe');
    expect(parsed.to).toBe('Åsa Brännström <asa@quillmere.example>');
    expect(parsed.from).toBe('Modeshelf <modeshelf@modeshelf.invalid>');
    expect(parsed.messageId).toBe('<kiln-7@quillmere.example>');
    expect(parsed.text).toBe(
      'Zeile eins\nZeile zwei mit Ümlaut und einem sehr langen Satz, der über die Grenze von sechsundsiebzig Zeichen hinausgeht.\n',
    );
    expect(parsed.html).toBe('<p>Zeile <b>eins</b> — ä</p>');
  });

  it('decodes base64 bodies and skips attachments in multipart/mixed', async () => {
    const raw = await compose({
      from: 'a@quillmere.example',
      to: 'b@quillmere.example',
      subject: 'plain',
      text: 'Kiln 3 ramp: 120 K/h\n',
      textEncoding: 'base64',
      attachments: [{ filename: 'rig.txt', content: 'not the body', contentType: 'text/plain' }],
    });
    expect(raw.toString('latin1')).toMatch(/Content-Transfer-Encoding: base64/);
    const parsed = await parseMessage(raw);
    expect(parsed.text).toBe('Kiln 3 ramp: 120 K/h\n');
    expect(parsed.html).toBeNull();
  });

  it('keeps a single-part 7bit message as it is', async () => {
    const parsed = await parseMessage('Subject: hello\r\nTo: x@y.example\r\n\r\nline one\r\nline two\r\n');
    expect(parsed.subject).toBe('hello');
    expect(parsed.to).toBe('x@y.example');
    expect(parsed.from).toBeNull();
    expect(parsed.messageId).toBeNull();
    expect(parsed.text).toBe('line one\nline two\n');
    expect(parsed.html).toBeNull();
  });

  it('gives an HTML-only message no text body, and quotes a display name only where it must', async () => {
    const raw = await compose({
      from: 'Modeshelf <modeshelf@modeshelf.invalid>',
      to: ['"Halden, Priya" <priya.halden@quillmere.example>', 'dara.lindqvist@quillmere.example'],
      subject: 'html only',
      html: '<p>Kiln 3</p>',
    });
    const parsed = await parseMessage(raw);
    expect(parsed.text).toBeNull();
    expect(parsed.html).toMatch(/^<p>Kiln 3<\/p>\s*$/);
    expect(parsed.from).toBe('Modeshelf <modeshelf@modeshelf.invalid>');
    expect(parsed.to).toBe('"Halden, Priya" <priya.halden@quillmere.example>, dara.lindqvist@quillmere.example');
  });
});

describe('encoded words in headers', () => {
  // The examples of RFC 2047 (Moore 1996, "MIME Part Three: Message Header Extensions for Non-ASCII Text"), §8.
  it.each([
    ['(=?ISO-8859-1?Q?a?=)', '(a)'],
    ['(=?ISO-8859-1?Q?a?= b)', '(a b)'],
    ['(=?ISO-8859-1?Q?a?= =?ISO-8859-1?Q?b?=)', '(ab)'],
    ['(=?ISO-8859-1?Q?a?=  =?ISO-8859-1?Q?b?=)', '(ab)'],
    ['(=?ISO-8859-1?Q?a?=\r\n    =?ISO-8859-1?Q?b?=)', '(ab)'],
    ['(=?ISO-8859-1?Q?a_b?=)', '(a b)'],
    ['(=?ISO-8859-1?Q?a?= =?ISO-8859-2?Q?_b?=)', '(a b)'],
    ['=?US-ASCII?Q?Keith_Moore?= <moore@cs.utk.edu>', 'Keith Moore <moore@cs.utk.edu>'],
    ['=?ISO-8859-1?Q?Andr=E9?= Pirard <PIRARD@vm1.ulg.ac.be>', 'André Pirard <PIRARD@vm1.ulg.ac.be>'],
    ['=?ISO-8859-1?B?SWYgeW91IGNhbiByZWFkIHRoaXMgeW8=?=', 'If you can read this yo'],
  ])('%s → %s', async (input, expected) => {
    const parsed = await parseMessage(`Subject: ${input}\r\nTo: x@y.example\r\n\r\nbody\r\n`);
    expect(parsed.subject).toBe(expected);
  });
});
