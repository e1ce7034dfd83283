/** Just enough MIME reading for the single-part text messages the app itself sends. */

export interface ParsedMessage {
  headers: Map<string, string>;
  subject: string;
  from: string;
  to: string;
  text: string;
}

function decodeQuotedPrintable(body: string): string {
  const joined = body.replace(/=\r?\n/g, '');
  const bytes: number[] = [];
  for (let i = 0; i < joined.length; i++) {
    const hex = joined.slice(i + 1, i + 3);
    if (joined[i] === '=' && /^[0-9A-Fa-f]{2}$/.test(hex)) {
      bytes.push(parseInt(hex, 16));
      i += 2;
    } else {
      bytes.push(...Buffer.from(joined[i] ?? '', 'utf8'));
    }
  }
  return Buffer.from(bytes).toString('utf8');
}

/** RFC 2047 encoded words, as nodemailer writes non-ASCII subjects and names. */
function decodeWords(value: string): string {
  return value.replace(/=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g, (_match, _charset: string, encoding: string, text: string) =>
    encoding.toUpperCase() === 'B' ? Buffer.from(text, 'base64').toString('utf8') : decodeQuotedPrintable(text.replace(/_/g, ' ')),
  );
}

export function parseMessage(raw: string): ParsedMessage {
  const split = raw.search(/\r?\n\r?\n/);
  const head = split === -1 ? raw : raw.slice(0, split);
  const body = split === -1 ? '' : raw.slice(split).replace(/^\r?\n\r?\n/, '');
  const headers = new Map<string, string>();
  for (const line of head.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon > 0) headers.set(line.slice(0, colon).trim().toLowerCase(), decodeWords(line.slice(colon + 1).trim()));
  }
  const encoding = (headers.get('content-transfer-encoding') ?? '7bit').toLowerCase();
  const text =
    encoding === 'quoted-printable'
      ? decodeQuotedPrintable(body)
      : encoding === 'base64'
        ? Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('utf8')
        : body;
  return {
    headers,
    subject: headers.get('subject') ?? '',
    from: headers.get('from') ?? '',
    to: headers.get('to') ?? '',
    text: text.replace(/\r\n/g, '\n').replace(/\n+$/, ''),
  };
}
