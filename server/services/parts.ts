// The team's parts library (component_parts): the part as the engine's partSchema reads it is kept in
// `ratings` (kind, part number, ratings in SI); `type` and `name` repeat kind and part number for
// the list's filters. Designs take a part through apply-part, which copies the values into the draft
// and records slot → part id in designs.part_refs.
import { and, asc, eq, gt, ilike, or, sql, type SQL } from 'drizzle-orm';
import { componentParts, designs, type ComponentPart } from '../../db/schema';
import type { AppContext } from '../context';
import { HttpError, badRequest, notFound } from '../errors';
import { applyPart, checkPart, citationsFor, partsImport, type Part, type PartRefs } from './bench';
import { containsPattern } from './projects';
import { iso } from './shape';

export function partOf(row: ComponentPart): Part {
  return { ...(row.ratings as Part), id: row.id } as Part;
}

export function shapePart(row: ComponentPart) {
  return { ...partOf(row), archived: row.archived, createdAt: iso(row.createdAt), updatedAt: iso(row.updatedAt) };
}

export interface ListPartsQuery {
  search?: string;
  kind?: string;
  archived?: boolean;
  cursor?: string;
  limit: number;
}

/** Ordered by part number (case-insensitive) then id; the cursor is the last [name, id]. */
export async function listParts(ctx: AppContext, teamId: string, query: ListPartsQuery) {
  let after: SQL | undefined;
  if (query.cursor) {
    let parsed: unknown;
    try {
      parsed = JSON.parse(Buffer.from(query.cursor, 'base64url').toString('utf8'));
    } catch {
      parsed = null;
    }
    if (!Array.isArray(parsed) || parsed.length !== 2 || typeof parsed[0] !== 'string' || typeof parsed[1] !== 'string')
      throw badRequest('The cursor is not one this server gave out.', [{ path: 'cursor', message: 'Invalid cursor.' }]);
    const [name, id] = parsed as [string, string];
    after = or(
      gt(sql`lower(${componentParts.name})`, name.toLowerCase()),
      and(eq(sql`lower(${componentParts.name})`, name.toLowerCase()), gt(componentParts.id, id)),
    );
  }
  const rows = await ctx.db
    .select()
    .from(componentParts)
    .where(
      and(
        eq(componentParts.teamId, teamId),
        eq(componentParts.archived, query.archived ?? false),
        query.kind ? eq(componentParts.type, query.kind) : undefined,
        query.search
          ? or(
              ilike(componentParts.name, containsPattern(query.search)),
              sql`${componentParts.ratings}->>'description' ilike ${containsPattern(query.search)}`,
              sql`${componentParts.ratings}->>'maker' ilike ${containsPattern(query.search)}`,
            )
          : undefined,
        after,
      ),
    )
    .orderBy(asc(sql`lower(${componentParts.name})`), asc(componentParts.id))
    .limit(query.limit + 1);
  const items = rows.slice(0, query.limit);
  const last = items[items.length - 1];
  const nextCursor = rows.length > query.limit && last ? Buffer.from(JSON.stringify([last.name, last.id])).toString('base64url') : null;
  return { items: items.map(shapePart), nextCursor };
}

export async function partRow(ctx: AppContext, teamId: string, id: string): Promise<ComponentPart> {
  const [row] = await ctx.db
    .select()
    .from(componentParts)
    .where(and(eq(componentParts.id, id), eq(componentParts.teamId, teamId)));
  if (!row) throw notFound('No such part.');
  return row;
}

const stored = (part: Part) => {
  const { id: _id, ...rest } = part as Part & { id?: string };
  return rest;
};

export async function createPart(ctx: AppContext, teamId: string, userId: string, input: unknown) {
  const part = checkPart(input);
  const [row] = await ctx.db
    .insert(componentParts)
    .values({ teamId, type: part.kind, name: part.partNumber, ratings: stored(part), createdBy: userId })
    .returning();
  return shapePart(row);
}

/** A PATCH sends the whole part or some fields; the merged part is validated again. */
export async function updatePart(ctx: AppContext, teamId: string, id: string, patch: Record<string, unknown>) {
  const row = await partRow(ctx, teamId, id);
  const { id: _ignored, archived: _a, createdAt: _c, updatedAt: _u, ...changes } = patch;
  const merged = { ...(row.ratings as Record<string, unknown>), ...changes };
  // A field sent as null is removed (an optional rating the part no longer gives).
  for (const [key, value] of Object.entries(merged)) if (value === null) delete merged[key];
  const part = checkPart(merged);
  const [updated] = await ctx.db
    .update(componentParts)
    .set({ type: part.kind, name: part.partNumber, ratings: stored(part), updatedAt: new Date() })
    .where(eq(componentParts.id, row.id))
    .returning();
  return shapePart(updated);
}

export async function setArchived(ctx: AppContext, teamId: string, id: string, archived: boolean) {
  const row = await partRow(ctx, teamId, id);
  const [updated] = await ctx.db
    .update(componentParts)
    .set({ archived, updatedAt: new Date() })
    .where(eq(componentParts.id, row.id))
    .returning();
  return shapePart(updated);
}

export async function allParts(ctx: AppContext, teamId: string, includeArchived = false): Promise<Part[]> {
  const rows = await ctx.db
    .select()
    .from(componentParts)
    .where(and(eq(componentParts.teamId, teamId), includeArchived ? undefined : eq(componentParts.archived, false)))
    .orderBy(asc(sql`lower(${componentParts.name})`), asc(componentParts.id));
  return rows.map(partOf);
}

/** All rows or none (unless validOnly); the answer lists every problem with its row and column. */
export async function importParts(ctx: AppContext, teamId: string, userId: string, input: string | Uint8Array, validOnly: boolean) {
  const result = partsImport(input, validOnly);
  const failed = result.errors.length > 0 && !validOnly;
  let imported = 0;
  if (!failed && result.parts.length > 0) {
    await ctx.db.transaction(async (tx) => {
      await tx
        .insert(componentParts)
        .values(result.parts.map((part) => ({ teamId, type: part.kind, name: part.partNumber, ratings: stored(part), createdBy: userId })));
    });
    imported = result.parts.length;
  }
  return { imported, rows: result.rows, validRows: result.validRows, errors: result.errors };
}

/** Copies a part's values into a design's draft and records which part the slot came from. */
export async function applyPartToDraft(ctx: AppContext, teamId: string, designId: string, slot: string, partId: string) {
  const [design] = await ctx.db.select().from(designs).where(and(eq(designs.id, designId), eq(designs.teamId, teamId)));
  if (!design) throw notFound('No such design.');
  const [row] = await ctx.db
    .select()
    .from(componentParts)
    .where(and(eq(componentParts.id, partId), eq(componentParts.teamId, teamId)));
  // Another team's part is "no such part", in the field's name.
  if (!row) throw new HttpError(404, 'not_found', 'No such part.', [{ path: 'partId', message: 'No such part.' }]);
  if (row.archived) throw new HttpError(409, 'conflict', 'That part is archived; unarchive it first.', [{ path: 'partId', message: 'archived' }]);
  const draft = design.draft && typeof design.draft === 'object' ? design.draft : {};
  const applied = applyPart(draft, slot, partOf(row), (design.partRefs ?? {}) as PartRefs);
  const now = new Date();
  await ctx.db
    .update(designs)
    .set({ draft: applied.design, partRefs: applied.partRefs, draftUpdatedAt: now, updatedAt: now })
    .where(eq(designs.id, design.id));
  const parts = await allParts(ctx, teamId, true);
  return {
    draft: applied.design,
    partRefs: applied.partRefs,
    written: applied.written,
    cleared: applied.cleared,
    citations: citationsFor(applied.partRefs, parts),
  };
}

export async function designPartRefs(ctx: AppContext, teamId: string, designId: string) {
  const [design] = await ctx.db
    .select({ partRefs: designs.partRefs })
    .from(designs)
    .where(and(eq(designs.id, designId), eq(designs.teamId, teamId)));
  if (!design) throw notFound('No such design.');
  const refs = (design.partRefs ?? {}) as PartRefs;
  return { partRefs: refs, citations: citationsFor(refs, await allParts(ctx, teamId, true)) };
}
