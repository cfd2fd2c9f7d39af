/**
 * Reads a raw Internet message (RFC 5322) as the local mail stand-in caught it, for the admin's
 * development page: the headers unfolded, encoded words in them decoded (RFC 2047), and the plain-text
 * body (the first text/plain part of a multipart message) decoded from quoted-printable or base64
 * (RFC 2045). Enough for the notices Isobar sends; not a general mail parser.
 */

export interface ReadMessage {
  headers: Array<{ name: string; value: string }>;
  subject: string;
  date: string | null;
  text: string;
}

function splitHead(raw: string): { head: string; body: string } {
  const m = /\r?\n\r?\n/.exec(raw);
  return m ? { head: raw.slice(0, m.index), body: raw.slice(m.index + m[0].length) } : { head: raw, body: '' };
}

function parseHeaders(head: string): Array<{ name: string; value: string }> {
  const unfolded = head.replace(/\r?\n[ \t]+/g, ' ');
  return unfolded
    .split(/\r?\n/)
    .map((line) => {
      const colon = line.indexOf(':');
      return colon > 0 ? { name: line.slice(0, colon).trim(), value: decodeWords(line.slice(colon + 1).trim()) } : null;
    })
    .filter((h): h is { name: string; value: string } => h !== null);
}

function bytesToText(bytes: number[], charset: string): string {
  try {
    return new TextDecoder(charset || 'utf-8').decode(new Uint8Array(bytes));
  } catch {
    return new TextDecoder('utf-8').decode(new Uint8Array(bytes));
  }
}

function quotedPrintableBytes(s: string, headerStyle: boolean): number[] {
  const source = headerStyle ? s.replace(/_/g, ' ') : s.replace(/=\r?\n/g, '');
  const out: number[] = [];
  for (let i = 0; i < source.length; i++) {
    const c = source[i];
    if (c === '=' && /^[0-9A-Fa-f]{2}$/.test(source.slice(i + 1, i + 3))) {
      out.push(parseInt(source.slice(i + 1, i + 3), 16));
      i += 2;
    } else {
      out.push(...Buffer.from(c, 'utf8'));
    }
  }
  return out;
}

/** `=?charset?Q|B?text?=` words in a header value. */
export function decodeWords(value: string): string {
  return value
    .replace(/(=\?[^?]+\?[QqBb]\?[^?]*\?=)\s+(?==\?)/g, '$1') // space between encoded words is not text
    .replace(/=\?([^?]+)\?([QqBb])\?([^?]*)\?=/g, (_, charset: string, enc: string, text: string) =>
      enc.toUpperCase() === 'B' ? bytesToText([...Buffer.from(text, 'base64')], charset) : bytesToText(quotedPrintableBytes(text, true), charset),
    );
}

const headerOf = (headers: Array<{ name: string; value: string }>, name: string) => headers.find((h) => h.name.toLowerCase() === name)?.value ?? null;

function parameter(value: string | null, name: string): string | null {
  const m = value ? new RegExp(`;\\s*${name}="?([^";]+)"?`, 'i').exec(value) : null;
  return m ? m[1] : null;
}

function decodeBody(body: string, encoding: string | null, charset: string): string {
  switch ((encoding ?? '7bit').toLowerCase()) {
    case 'quoted-printable':
      return bytesToText(quotedPrintableBytes(body, false), charset);
    case 'base64':
      return bytesToText([...Buffer.from(body.replace(/\s+/g, ''), 'base64')], charset);
    default:
      return body;
  }
}

/** The plain text of a part (recursing into multiparts), or null when it has none. */
function plainText(head: Array<{ name: string; value: string }>, body: string): string | null {
  const type = headerOf(head, 'content-type') ?? 'text/plain';
  if (/^multipart\//i.test(type)) {
    const boundary = parameter(type, 'boundary');
    if (!boundary) return null;
    const parts = body.split(`--${boundary}`).slice(1);
    for (const part of parts) {
      if (part.startsWith('--')) break;
      const { head: h, body: b } = splitHead(part.replace(/^\r?\n/, ''));
      const text = plainText(parseHeaders(h), b);
      if (text !== null) return text;
    }
    return null;
  }
  if (!/^text\/plain/i.test(type)) return null;
  return decodeBody(body, headerOf(head, 'content-transfer-encoding'), parameter(type, 'charset') ?? 'utf-8').replace(/\r\n/g, '\n').replace(/\n+$/, '');
}

export function readMessage(raw: string): ReadMessage {
  const { head, body } = splitHead(raw);
  const headers = parseHeaders(head);
  return {
    headers,
    subject: headerOf(headers, 'subject') ?? '',
    date: headerOf(headers, 'date'),
    text: plainText(headers, body) ?? '',
  };
}
