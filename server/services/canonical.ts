// The canonical serialisation that revision hashes are taken over: object keys sorted by UTF-16
// code unit (JavaScript's default sort), no whitespace, numbers as JSON writes them (the shortest
// text that reads back to the same double), strings as JSON escapes them, undefined members left
// out. The same value always gives the same bytes.
import { createHash } from 'node:crypto';

export class CanonicalJsonError extends Error {
  constructor(
    readonly path: string,
    message: string,
  ) {
    super(`${path || '(root)'}: ${message}`);
    this.name = 'CanonicalJsonError';
  }
}

export function canonicalJson(value: unknown): string {
  return write(value, '');
}

function write(value: unknown, path: string): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'number':
      // NaN and ±Infinity have no JSON form; silently writing null would change the design.
      if (!Number.isFinite(value)) throw new CanonicalJsonError(path, `${value} cannot be stored; use a finite number.`);
      return JSON.stringify(Object.is(value, -0) ? 0 : value);
    case 'string':
    case 'boolean':
      return JSON.stringify(value);
    case 'object': {
      if (Array.isArray(value))
        return `[${value.map((item, i) => (item === undefined ? 'null' : write(item, `${path}.${i}`))).join(',')}]`;
      const entries = Object.keys(value as object)
        .filter((key) => (value as Record<string, unknown>)[key] !== undefined)
        .sort()
        .map((key) => `${JSON.stringify(key)}:${write((value as Record<string, unknown>)[key], path ? `${path}.${key}` : key)}`);
      return `{${entries.join(',')}}`;
    }
    default:
      throw new CanonicalJsonError(path, `a ${typeof value} has no JSON form.`);
  }
}

export function sha256Hex(text: string | Buffer): string {
  return createHash('sha256').update(text).digest('hex');
}

export function canonicalHash(value: unknown): string {
  return sha256Hex(canonicalJson(value));
}
