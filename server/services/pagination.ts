// Keyset pagination, newest first, over (timestamp, id). The cursor is opaque to the client:
// base64url of [ISO timestamp, id] (or [number] for the audit log's serial id).
import { and, eq, lt, or, type AnyColumn, type SQL } from 'drizzle-orm';
import type { Page } from '../../lib/contracts/common';
import { badRequest } from '../errors';

type Cursor = [string, string];

export function encodeCursor(parts: (string | number)[]): string {
  return Buffer.from(JSON.stringify(parts)).toString('base64url');
}

function decode(cursor: string): unknown {
  try {
    return JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8'));
  } catch {
    return null;
  }
}

const invalidCursor = () =>
  badRequest('The cursor is not one this server gave out.', [{ path: 'cursor', message: 'Invalid cursor.' }]);

/** WHERE clause for rows after the cursor in (column DESC, id DESC) order. */
export function afterCursor(cursor: string | undefined, column: AnyColumn, idColumn: AnyColumn): SQL | undefined {
  if (!cursor) return undefined;
  const parts = decode(cursor);
  if (!Array.isArray(parts) || parts.length !== 2 || typeof parts[0] !== 'string' || typeof parts[1] !== 'string')
    throw invalidCursor();
  const [stamp, id] = parts as Cursor;
  const at = new Date(stamp);
  if (Number.isNaN(at.getTime()) || !/^[0-9a-f-]{36}$/i.test(id)) throw invalidCursor();
  return or(lt(column, at), and(eq(column, at), lt(idColumn, id)));
}

export function afterSerialCursor(cursor: string | undefined, idColumn: AnyColumn): SQL | undefined {
  if (!cursor) return undefined;
  const parts = decode(cursor);
  if (!Array.isArray(parts) || parts.length !== 1 || !Number.isSafeInteger(parts[0])) throw invalidCursor();
  return lt(idColumn, parts[0] as number);
}

/** Rows were fetched with limit + 1: the extra one says whether there is a next page. */
export function toPage<Row, Item>(
  rows: Row[],
  limit: number,
  key: (row: Row) => (string | number)[],
  shape: (row: Row) => Item,
): Page<Item> {
  const items = rows.slice(0, limit);
  const nextCursor = rows.length > limit && items.length > 0 ? encodeCursor(key(items[items.length - 1])) : null;
  return { items: items.map(shape), nextCursor };
}
