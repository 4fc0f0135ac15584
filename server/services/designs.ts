// Designs: a working copy (draft, stored as sent, possibly invalid) and a line of immutable
// revisions. The design row carries the summary the lists show: worst status of the latest
// revision's check and the review state of that revision.
import { and, desc, eq, isNotNull, isNull, ne, sql } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { designs, projects, reviews, revisions, type DesignRow, type RevisionRow } from '../../db/schema';
import type { Page } from '../../lib/contracts/common';
import type { z } from 'zod';
import type {
  listDesignsQuerySchema,
  CreateDesignRequest,
  DesignDetail,
  DesignSummary,
  RevisionSummary,
  UpdateDesignRequest,
} from '../../lib/contracts/designs';
import type { AppContext } from '../context';
import { conflict, HttpError, notFound } from '../errors';
import { recordAudit, type AuditEntry } from './audit';
import { findPreset, validateDesign } from './engine';
import { afterCursor, toPage } from './pagination';
import { containsPattern } from './projects';
import { iso, isoOrNull, loadUsers, userRef, type UserMap } from './shape';

type AuditBase = Pick<AuditEntry, 'actor' | 'ip'>;

export function shapeDesign(row: DesignRow, projectName: string, people: UserMap): DesignSummary {
  return {
    id: row.id,
    teamId: row.teamId,
    projectId: row.projectId,
    projectName,
    name: row.name,
    description: row.description,
    presetId: row.presetId,
    status: row.status,
    reviewState: row.reviewState,
    revisionCount: row.revisionCount,
    latestRevisionId: row.latestRevisionId,
    createdBy: userRef(people, row.createdBy),
    createdAt: iso(row.createdAt),
    updatedAt: iso(row.updatedAt),
    archivedAt: isoOrNull(row.archivedAt),
  };
}

export function shapeRevisionSummary(row: RevisionRow, people: UserMap): RevisionSummary {
  return {
    id: row.id,
    designId: row.designId,
    sequence: row.sequence,
    sha256: row.sha256,
    engineVersion: row.engineVersion,
    worstStatus: row.worstStatus,
    note: row.note,
    author: userRef(people, row.authorId),
    createdAt: iso(row.createdAt),
  };
}

export async function listDesigns(
  ctx: AppContext,
  teamId: string,
  query: z.infer<typeof listDesignsQuerySchema>,
): Promise<Page<DesignSummary>> {
  const rows = await ctx.db
    .select({ design: designs, projectName: projects.name })
    .from(designs)
    .innerJoin(projects, eq(projects.id, designs.projectId))
    .where(
      and(
        eq(designs.teamId, teamId),
        query.archived ? isNotNull(designs.archivedAt) : isNull(designs.archivedAt),
        query.projectId ? eq(designs.projectId, query.projectId) : undefined,
        query.status ? eq(designs.status, query.status) : undefined,
        query.reviewState ? eq(designs.reviewState, query.reviewState) : undefined,
        query.search ? sql`${designs.name} ilike ${containsPattern(query.search)}` : undefined,
        afterCursor(query.cursor, designs.updatedAt, designs.id),
      ),
    )
    .orderBy(desc(designs.updatedAt), desc(designs.id))
    .limit(query.limit + 1);
  const people = await loadUsers(
    ctx.db,
    rows.map((r) => r.design.createdBy),
  );
  return toPage(
    rows,
    query.limit,
    (r) => [r.design.updatedAt.toISOString(), r.design.id],
    (r) => shapeDesign(r.design, r.projectName, people),
  );
}

export async function getDesignRow(
  db: Database,
  teamId: string,
  id: string,
): Promise<{ design: DesignRow; projectName: string }> {
  const [row] = await db
    .select({ design: designs, projectName: projects.name })
    .from(designs)
    .innerJoin(projects, eq(projects.id, designs.projectId))
    .where(and(eq(designs.id, id), eq(designs.teamId, teamId)));
  if (!row) throw notFound('No such design.');
  return row;
}

export async function getDesign(ctx: AppContext, teamId: string, id: string): Promise<DesignDetail> {
  const { design, projectName } = await getDesignRow(ctx.db, teamId, id);
  const [latest] = design.latestRevisionId
    ? await ctx.db.select().from(revisions).where(eq(revisions.id, design.latestRevisionId))
    : [];
  const people = await loadUsers(ctx.db, [design.createdBy, latest?.authorId]);
  const validation = validateDesign(design.draft);
  return {
    ...shapeDesign(design, projectName, people),
    draft: design.draft,
    draftUpdatedAt: iso(design.draftUpdatedAt),
    draftValidation: { valid: validation.valid, issues: validation.issues },
    latestRevision: latest ? shapeRevisionSummary(latest, people) : null,
  };
}

async function requireProjectInTeam(db: Database, teamId: string, projectId: string): Promise<void> {
  const [project] = await db
    .select({ id: projects.id })
    .from(projects)
    .where(and(eq(projects.id, projectId), eq(projects.teamId, teamId)));
  // The same words as any other missing project: another team's project id reveals nothing.
  if (!project) throw new HttpError(404, 'not_found', 'No such project.', [{ path: 'projectId', message: 'No such project.' }]);
}

export async function createDesign(
  ctx: AppContext,
  teamId: string,
  userId: string,
  input: CreateDesignRequest & { description: string },
  audit: AuditBase,
): Promise<DesignDetail> {
  await requireProjectInTeam(ctx.db, teamId, input.projectId);
  let draft = input.draft;
  if (input.presetId) {
    const preset = findPreset(input.presetId);
    if (!preset)
      throw new HttpError(422, 'unknown_preset', `There is no preset "${input.presetId}".`, [
        { path: 'presetId', message: 'Unknown preset.' },
      ]);
    draft ??= preset.design;
  }
  const id = await ctx.db.transaction(async (tx) => {
    const [row] = await tx
      .insert(designs)
      .values({
        teamId,
        projectId: input.projectId,
        name: input.name,
        description: input.description,
        presetId: input.presetId ?? null,
        draft: draft ?? {},
        createdBy: userId,
      })
      .returning({ id: designs.id });
    await tx.update(projects).set({ updatedAt: new Date() }).where(eq(projects.id, input.projectId));
    await recordAudit(tx, {
      ...audit,
      action: 'design.created',
      teamId,
      entity: { type: 'design', id: row.id },
      details: { name: input.name, presetId: input.presetId ?? null },
    });
    return row.id;
  });
  return getDesign(ctx, teamId, id);
}

export async function updateDesign(
  ctx: AppContext,
  teamId: string,
  id: string,
  input: UpdateDesignRequest,
  audit: AuditBase,
): Promise<DesignDetail> {
  if (input.projectId) await requireProjectInTeam(ctx.db, teamId, input.projectId);
  await ctx.db.transaction(async (tx) => {
    const now = new Date();
    const changes: Partial<typeof designs.$inferInsert> = { updatedAt: now };
    if (input.name !== undefined) changes.name = input.name;
    if (input.description !== undefined) changes.description = input.description;
    if (input.projectId !== undefined) changes.projectId = input.projectId;
    if (input.archived !== undefined) changes.archivedAt = input.archived ? now : null;
    if (input.draft !== undefined) {
      changes.draft = input.draft;
      changes.draftUpdatedAt = now;
    }
    const updated = await tx
      .update(designs)
      .set(changes)
      .where(and(eq(designs.id, id), eq(designs.teamId, teamId)))
      .returning({ id: designs.id });
    if (updated.length === 0) throw notFound('No such design.');
    // Edits of the working copy are not evidence (revisions are); renames, moves and archiving are.
    const { draft: _draft, ...recorded } = input;
    if (Object.keys(recorded).length > 0) {
      await recordAudit(tx, { ...audit, action: 'design.updated', teamId, entity: { type: 'design', id }, details: recorded });
    }
  });
  return getDesign(ctx, teamId, id);
}

export async function deleteDesign(ctx: AppContext, teamId: string, id: string, audit: AuditBase): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    const [row] = await tx
      .select()
      .from(designs)
      .where(and(eq(designs.id, id), eq(designs.teamId, teamId)));
    if (!row) throw notFound('No such design.');
    if (row.revisionCount > 0)
      throw conflict('This design has saved revisions, which are part of the record. Archive it instead.');
    await tx.delete(designs).where(eq(designs.id, id));
    await recordAudit(tx, {
      ...audit,
      action: 'design.deleted',
      teamId,
      entity: { type: 'design', id },
      details: { name: row.name },
    });
  });
}

/** The design's review state, from the reviews of its latest revision. */
export async function refreshReviewState(db: Pick<Database, 'select' | 'update'>, designId: string): Promise<void> {
  const [design] = await db.select({ latest: designs.latestRevisionId }).from(designs).where(eq(designs.id, designId));
  if (!design?.latest) return;
  const states = (
    await db
      .select({ state: reviews.state })
      .from(reviews)
      .where(and(eq(reviews.revisionId, design.latest), ne(reviews.state, 'superseded')))
  ).map((r) => r.state);
  const reviewState = states.includes('changes-requested')
    ? 'changes-requested'
    : states.includes('requested')
      ? 'requested'
      : states.includes('approved')
        ? 'approved'
        : 'none';
  await db.update(designs).set({ reviewState }).where(eq(designs.id, designId));
}
