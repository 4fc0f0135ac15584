// Projects group a team's designs. A project with designs cannot be deleted (archive it instead):
// its designs' revisions are part of the record.
import { and, count, desc, eq, isNotNull, isNull, sql } from 'drizzle-orm';
import { designs, projects } from '../../db/schema';
import type { z } from 'zod';
import type { CreateProjectRequest, listProjectsQuerySchema, Project, UpdateProjectRequest } from '../../lib/contracts/designs';
import type { Page } from '../../lib/contracts/common';
import type { AppContext } from '../context';
import { conflict, notFound } from '../errors';
import { isUniqueViolation } from './accounts';
import { recordAudit, type AuditEntry } from './audit';
import { afterCursor, toPage } from './pagination';
import { iso, isoOrNull, loadUsers, userRef, type UserMap } from './shape';

type AuditBase = Pick<AuditEntry, 'actor' | 'ip'>;

/** ILIKE pattern for a substring search, with the wildcards escaped. */
export const containsPattern = (text: string) => `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

const designCount = sql<number>`(select count(*)::int from ${designs} where ${designs.projectId} = ${projects.id})`;

function shapeProject(row: typeof projects.$inferSelect & { designCount: number }, people: UserMap): Project {
  return {
    id: row.id,
    teamId: row.teamId,
    name: row.name,
    description: row.description,
    designCount: Number(row.designCount),
    createdBy: userRef(people, row.createdBy),
    createdAt: iso(row.createdAt),
    updatedAt: iso(row.updatedAt),
    archivedAt: isoOrNull(row.archivedAt),
  };
}

export async function listProjects(
  ctx: AppContext,
  teamId: string,
  query: z.infer<typeof listProjectsQuerySchema>,
): Promise<Page<Project>> {
  const rows = await ctx.db
    .select({ project: projects, designCount })
    .from(projects)
    .where(
      and(
        eq(projects.teamId, teamId),
        query.archived ? isNotNull(projects.archivedAt) : isNull(projects.archivedAt),
        query.search ? sql`${projects.name} ilike ${containsPattern(query.search)}` : undefined,
        afterCursor(query.cursor, projects.updatedAt, projects.id),
      ),
    )
    .orderBy(desc(projects.updatedAt), desc(projects.id))
    .limit(query.limit + 1);
  const people = await loadUsers(
    ctx.db,
    rows.map((r) => r.project.createdBy),
  );
  return toPage(
    rows,
    query.limit,
    (r) => [r.project.updatedAt.toISOString(), r.project.id],
    (r) => shapeProject({ ...r.project, designCount: r.designCount }, people),
  );
}

export async function getProject(ctx: AppContext, teamId: string, id: string): Promise<Project> {
  const [row] = await ctx.db
    .select({ project: projects, designCount })
    .from(projects)
    .where(and(eq(projects.id, id), eq(projects.teamId, teamId)));
  if (!row) throw notFound('No such project.');
  const people = await loadUsers(ctx.db, [row.project.createdBy]);
  return shapeProject({ ...row.project, designCount: row.designCount }, people);
}

const duplicateName = (name: string) => conflict(`This team already has a project called "${name}".`);

export async function createProject(
  ctx: AppContext,
  teamId: string,
  userId: string,
  input: Required<Pick<CreateProjectRequest, 'name'>> & { description: string },
  audit: AuditBase,
): Promise<Project> {
  try {
    const id = await ctx.db.transaction(async (tx) => {
      const [row] = await tx
        .insert(projects)
        .values({ teamId, name: input.name, description: input.description, createdBy: userId })
        .returning();
      await recordAudit(tx, {
        ...audit,
        action: 'project.created',
        teamId,
        entity: { type: 'project', id: row.id },
        details: { name: row.name },
      });
      return row.id;
    });
    return getProject(ctx, teamId, id);
  } catch (error) {
    if (isUniqueViolation(error)) throw duplicateName(input.name);
    throw error;
  }
}

export async function updateProject(
  ctx: AppContext,
  teamId: string,
  id: string,
  input: UpdateProjectRequest,
  audit: AuditBase,
): Promise<Project> {
  try {
    await ctx.db.transaction(async (tx) => {
      const changes: Partial<typeof projects.$inferInsert> = { updatedAt: new Date() };
      if (input.name !== undefined) changes.name = input.name;
      if (input.description !== undefined) changes.description = input.description;
      if (input.archived !== undefined) changes.archivedAt = input.archived ? new Date() : null;
      const updated = await tx
        .update(projects)
        .set(changes)
        .where(and(eq(projects.id, id), eq(projects.teamId, teamId)))
        .returning({ id: projects.id });
      if (updated.length === 0) throw notFound('No such project.');
      await recordAudit(tx, {
        ...audit,
        action: 'project.updated',
        teamId,
        entity: { type: 'project', id },
        details: { ...input },
      });
    });
  } catch (error) {
    if (isUniqueViolation(error)) throw duplicateName(input.name ?? '');
    throw error;
  }
  return getProject(ctx, teamId, id);
}

export async function deleteProject(ctx: AppContext, teamId: string, id: string, audit: AuditBase): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    const [{ value }] = await tx.select({ value: count() }).from(designs).where(eq(designs.projectId, id));
    if (value > 0) throw conflict('This project has designs. Move or delete them first, or archive the project.');
    const deleted = await tx
      .delete(projects)
      .where(and(eq(projects.id, id), eq(projects.teamId, teamId)))
      .returning({ name: projects.name });
    if (deleted.length === 0) throw notFound('No such project.');
    await recordAudit(tx, {
      ...audit,
      action: 'project.deleted',
      teamId,
      entity: { type: 'project', id },
      details: { name: deleted[0].name },
    });
  });
}
