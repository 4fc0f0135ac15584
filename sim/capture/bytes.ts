/**
 * From the uploaded bytes to text: the size limit, the "binary file with a .csv name" test, and the
 * decoding (UTF-8, falling back to Windows-1252 for the odd "µs" written by an older logger).
 * Plain TypeScript (TextDecoder), so that the app can run the same checks before uploading.
 */
import { CaptureError } from './errors';

export const DEFAULT_MAX_BYTES = 20 * 1024 * 1024;

/** How much of the file the binary test looks at; a CSV export is text from its first byte. */
const SNIFF_BYTES = 64 * 1024;
/** Share of control bytes or undecodable sequences above which the file is called binary. */
const BINARY_SHARE = 0.1;

function tooLarge(size: number, maxBytes: number): CaptureError {
  const mb = (n: number) => `${(n / (1024 * 1024)).toFixed(1)} MB`;
  return new CaptureError('too-large', `the file is ${mb(size)}, over the ${mb(maxBytes)} limit`);
}

function binary(): CaptureError {
  return new CaptureError('binary', 'this looks like a binary file, not a CSV export; save or export it as CSV (or TSV) text');
}

/** A control character that text exports never contain (tab, LF, FF and CR are allowed). */
function isControl(code: number): boolean {
  return (code < 0x20 && code !== 0x09 && code !== 0x0a && code !== 0x0c && code !== 0x0d) || code === 0x7f;
}

/** UTF-8 length of a string, stopping early once it passes `limit`. */
function utf8Length(text: string, limit: number): number {
  let bytes = 0;
  for (let k = 0; k < text.length && bytes <= limit; k++) {
    const code = text.charCodeAt(k);
    if (code < 0x80) bytes += 1;
    else if (code < 0x800) bytes += 2;
    else if (code >= 0xd800 && code <= 0xdbff) {
      bytes += 4;
      k++;
    } else bytes += 3;
  }
  return bytes;
}

function checkText(text: string, sniffLength: number): void {
  if (text.indexOf('\u0000') !== -1) throw binary();
  const end = Math.min(text.length, sniffLength);
  let suspicious = 0;
  for (let k = 0; k < end; k++) {
    const code = text.charCodeAt(k);
    if (isControl(code) || code === 0xfffd) suspicious++;
  }
  if (end > 0 && suspicious / end > BINARY_SHARE) throw binary();
}

/**
 * The file's text without a BOM. Throws CaptureError 'too-large' or 'binary'. A string input is
 * checked the same way (its UTF-8 size; NUL and control characters).
 */
export function captureText(input: string | Uint8Array, maxBytes = DEFAULT_MAX_BYTES): string {
  let text: string;
  if (typeof input === 'string') {
    const size = utf8Length(input, maxBytes);
    if (size > maxBytes) throw tooLarge(size, maxBytes);
    checkText(input, SNIFF_BYTES);
    text = input;
  } else {
    if (input.byteLength > maxBytes) throw tooLarge(input.byteLength, maxBytes);
    if (input.indexOf(0) !== -1) throw binary();
    let decoded: string;
    try {
      decoded = new TextDecoder('utf-8', { fatal: true }).decode(input);
    } catch {
      // Not UTF-8. A few bytes above 0x7F (µ, °, Ω) are an old 8-bit export; many are a binary file.
      const sniff = input.subarray(0, SNIFF_BYTES);
      let invalid = 0;
      const lenient = new TextDecoder('utf-8').decode(sniff);
      for (let k = 0; k < lenient.length; k++) if (lenient.charCodeAt(k) === 0xfffd) invalid++;
      if (sniff.length > 0 && invalid / sniff.length > BINARY_SHARE) throw binary();
      decoded = new TextDecoder('windows-1252').decode(input);
    }
    checkText(decoded, SNIFF_BYTES);
    text = decoded;
  }
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}
