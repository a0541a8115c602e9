/**
 * A small reader of the MIME messages our own mailer sends (RFC 5322 headers, RFC 2045
 * transfer encodings, RFC 2046 multipart, RFC 2047 encoded words), enough for the local mail
 * server's outbox: the headers, the plain-text part and the HTML part.
 */

export interface ParsedMessage {
  headers: Map<string, string>;
  subject: string;
  from: string;
  to: string;
  text: string;
  html: string | null;
}

function splitHeadAndBody(raw: string): [string, string] {
  const match = /\r?\n\r?\n/.exec(raw);
  if (!match) return [raw, ''];
  return [raw.slice(0, match.index), raw.slice(match.index + match[0].length)];
}

function parseHeaders(head: string): Map<string, string> {
  const headers = new Map<string, string>();
  const unfolded = head.replace(/\r?\n[ \t]+/g, ' ');
  for (const line of unfolded.split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon <= 0) continue;
    const name = line.slice(0, colon).trim().toLowerCase();
    if (!headers.has(name)) headers.set(name, line.slice(colon + 1).trim());
  }
  return headers;
}

function decodeBytes(bytes: Buffer, charset: string): string {
  try {
    return new TextDecoder(charset || 'utf-8').decode(bytes);
  } catch {
    return bytes.toString('utf8');
  }
}

function decodeQuotedPrintable(text: string): Buffer {
  const soft = text.replace(/=\r?\n/g, '');
  const bytes: number[] = [];
  for (let i = 0; i < soft.length; i++) {
    const ch = soft[i];
    if (ch === '=' && /^[0-9A-Fa-f]{2}$/.test(soft.slice(i + 1, i + 3))) {
      bytes.push(parseInt(soft.slice(i + 1, i + 3), 16));
      i += 2;
    } else {
      bytes.push(...Buffer.from(ch ?? '', 'utf8'));
    }
  }
  return Buffer.from(bytes);
}

/** Decodes RFC 2047 encoded words (=?charset?B|Q?text?=) in a header value. */
export function decodeWords(value: string): string {
  return value
    .replace(/\?=\s+=\?/g, '?==?')
    .replace(/=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g, (_all, charset: string, encoding: string, text: string) => {
      const bytes = encoding.toUpperCase() === 'B' ? Buffer.from(text, 'base64') : decodeQuotedPrintable(text.replace(/_/g, ' '));
      return decodeBytes(bytes, charset);
    });
}

function param(header: string | undefined, name: string): string {
  const match = new RegExp(`${name}="?([^";]+)"?`, 'i').exec(header ?? '');
  return match?.[1] ?? '';
}

function decodeBody(headers: Map<string, string>, body: string): string {
  const encoding = (headers.get('content-transfer-encoding') ?? '7bit').toLowerCase();
  const charset = param(headers.get('content-type'), 'charset') || 'utf-8';
  if (encoding === 'base64') return decodeBytes(Buffer.from(body.replace(/\s+/g, ''), 'base64'), charset);
  if (encoding === 'quoted-printable') return decodeBytes(decodeQuotedPrintable(body), charset);
  return body;
}

function collectParts(headers: Map<string, string>, body: string, into: { text: string | null; html: string | null }): void {
  const type = (headers.get('content-type') ?? 'text/plain').toLowerCase();
  if (type.startsWith('multipart/')) {
    const boundary = param(headers.get('content-type'), 'boundary');
    if (!boundary) return;
    const sections = body.split(`--${boundary}`);
    for (const section of sections.slice(1)) {
      if (section.startsWith('--')) break;
      const [partHead, partBody] = splitHeadAndBody(section.replace(/^\r?\n/, ''));
      collectParts(parseHeaders(partHead), partBody.replace(/\r?\n$/, ''), into);
    }
    return;
  }
  if (type.startsWith('text/html')) into.html ??= decodeBody(headers, body);
  else if (type.startsWith('text/plain')) into.text ??= decodeBody(headers, body);
}

export function parseMessage(raw: string): ParsedMessage {
  const [head, body] = splitHeadAndBody(raw);
  const headers = parseHeaders(head);
  const parts: { text: string | null; html: string | null } = { text: null, html: null };
  collectParts(headers, body, parts);
  return {
    headers,
    subject: decodeWords(headers.get('subject') ?? ''),
    from: decodeWords(headers.get('from') ?? ''),
    to: decodeWords(headers.get('to') ?? ''),
    text: (parts.text ?? '').replace(/\r\n/g, '\n'),
    html: parts.html,
  };
}
