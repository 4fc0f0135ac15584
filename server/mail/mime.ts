// Just enough of RFC 5322 / MIME (RFC 2045–2047) to read back what nodemailer writes: unfolded
// headers with encoded words, multipart bodies, quoted-printable and base64 parts. The capture
// server uses it; it is not a general mail parser.
export interface ParsedMail {
  headers: Record<string, string>;
  subject: string;
  from: string;
  to: string[];
  text: string | null;
  html: string | null;
}

interface Part {
  headers: Record<string, string>;
  body: string; // latin1 "binary" string: one char per byte
}

export function parseMail(raw: Buffer): ParsedMail {
  const root = splitPart(raw.toString('latin1'));
  const found: { text: string | null; html: string | null } = { text: null, html: null };
  collectBodies(root, found);
  const headers = Object.fromEntries(Object.entries(root.headers).map(([k, v]) => [k, decodeWords(v)]));
  return {
    headers,
    subject: headers.subject ?? '',
    from: headers.from ?? '',
    to: (headers.to ?? '')
      .split(',')
      .map((a) => a.trim())
      .filter(Boolean),
    text: found.text,
    html: found.html,
  };
}

function splitPart(source: string): Part {
  const match = /\r?\n\r?\n/.exec(source);
  const head = match ? source.slice(0, match.index) : source;
  const body = match ? source.slice(match.index + match[0].length) : '';
  const headers: Record<string, string> = {};
  for (const line of head.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon <= 0) continue;
    const name = line.slice(0, colon).trim().toLowerCase();
    if (!(name in headers)) headers[name] = line.slice(colon + 1).trim();
  }
  return { headers, body };
}

function collectBodies(part: Part, found: { text: string | null; html: string | null }): void {
  const contentType = part.headers['content-type'] ?? 'text/plain';
  const type = contentType.split(';')[0].trim().toLowerCase();
  if (type.startsWith('multipart/')) {
    const boundary = parameter(contentType, 'boundary');
    if (!boundary) return;
    for (const child of splitMultipart(part.body, boundary)) collectBodies(splitPart(child), found);
    return;
  }
  if (type !== 'text/plain' && type !== 'text/html') return;
  const disposition = (part.headers['content-disposition'] ?? '').toLowerCase();
  if (disposition.startsWith('attachment')) return;
  const bytes = decodeTransfer(part.body, (part.headers['content-transfer-encoding'] ?? '7bit').toLowerCase());
  // Line ends on the wire are CRLF; stored text uses LF like the text that was sent.
  const text = decodeCharset(bytes, parameter(contentType, 'charset') ?? 'utf-8').replace(/\r\n/g, '\n');
  if (type === 'text/plain' && found.text === null) found.text = text;
  if (type === 'text/html' && found.html === null) found.html = text;
}

function splitMultipart(body: string, boundary: string): string[] {
  const parts: string[] = [];
  const delimiter = `--${boundary}`;
  const sections = body.split(new RegExp(`\\r?\\n?${escapeRegExp(delimiter)}`));
  // sections[0] is the preamble; a section starting with "--" is the closing delimiter.
  for (const section of sections.slice(1)) {
    if (section.startsWith('--')) break;
    parts.push(section.replace(/^[ \t]*\r?\n/, ''));
  }
  return parts;
}

function parameter(header: string, name: string): string | null {
  const match = new RegExp(`;\\s*${name}\\s*=\\s*("([^"]*)"|[^;\\s]+)`, 'i').exec(header);
  if (!match) return null;
  return match[2] ?? match[1];
}

function decodeTransfer(body: string, encoding: string): Buffer {
  if (encoding === 'base64') return Buffer.from(body.replace(/[^A-Za-z0-9+/=]/g, ''), 'base64');
  if (encoding === 'quoted-printable') {
    const unfolded = body.replace(/=\r?\n/g, '');
    const bytes: number[] = [];
    for (let i = 0; i < unfolded.length; i++) {
      const c = unfolded[i];
      if (c === '=' && /^[0-9A-Fa-f]{2}$/.test(unfolded.slice(i + 1, i + 3))) {
        bytes.push(parseInt(unfolded.slice(i + 1, i + 3), 16));
        i += 2;
      } else {
        bytes.push(unfolded.charCodeAt(i) & 0xff);
      }
    }
    return Buffer.from(bytes);
  }
  return Buffer.from(body, 'latin1');
}

function decodeCharset(bytes: Buffer, charset: string): string {
  try {
    return new TextDecoder(charset.toLowerCase()).decode(bytes);
  } catch {
    return bytes.toString('utf8');
  }
}

/** RFC 2047 encoded words (=?utf-8?Q?…?= and =?utf-8?B?…?=); whitespace between two words goes. */
export function decodeWords(value: string): string {
  return value
    .replace(/(=\?[^?]+\?[QqBb]\?[^?]*\?=)\s+(?==\?[^?]+\?[QqBb]\?[^?]*\?=)/g, '$1')
    .replace(/=\?([^?]+)\?([QqBb])\?([^?]*)\?=/g, (_m, charset: string, encoding: string, text: string) => {
      const bytes =
        encoding.toUpperCase() === 'B'
          ? Buffer.from(text, 'base64')
          : decodeTransfer(text.replace(/_/g, ' '), 'quoted-printable');
      return decodeCharset(bytes, charset);
    });
}

function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}
