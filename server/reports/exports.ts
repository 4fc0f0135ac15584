// The waveform CSV and the JSON export of a revision. Both are computed from the stored revision
// only, so the same revision always exports the same content.
import { and, asc, eq } from 'drizzle-orm';
import { analysisRuns, designs, projects, reviews, revisions, teams } from '../../db/schema';
import type { AppContext } from '../context';
import { notFound } from '../errors';
import { runCheck, type CheckOutcome, type StoredPolicy } from '../services/engine';
import { iso, isoOrNull, loadUsers, userRef } from '../services/shape';
import { csvRow } from './csv';

export async function loadRevisionForExport(ctx: AppContext, teamId: string, revisionId: string) {
  const [row] = await ctx.db
    .select({
      revision: revisions,
      designName: designs.name,
      designId: designs.id,
      latestRevisionId: designs.latestRevisionId,
      projectName: projects.name,
      teamName: teams.name,
    })
    .from(revisions)
    .innerJoin(designs, eq(designs.id, revisions.designId))
    .innerJoin(projects, eq(projects.id, designs.projectId))
    .innerJoin(teams, eq(teams.id, revisions.teamId))
    .where(and(eq(revisions.id, revisionId), eq(revisions.teamId, teamId)));
  if (!row) throw notFound('No such revision.');
  return row;
}

export async function waveformsCsv(ctx: AppContext, teamId: string, revisionId: string) {
  const row = await loadRevisionForExport(ctx, teamId, revisionId);
  const { revision } = row;
  const check = runCheck(JSON.parse(revision.designJson), (revision.policy as StoredPolicy).team);
  const w = check.waveform;
  const columns: [string, number[] | null | undefined][] = [
    ['t_s', w.t],
    ['vC_V', w.vC],
    ['v_V', w.v],
    ['i_A', w.i],
    ['vD_V', w.vD],
    ['prechargePower_W', w.prechargePower],
  ];
  const present = columns.filter(([, values]) => Array.isArray(values) && values.length === w.t.length);
  const lines = [
    csvRow(['# Ringwell waveforms']),
    csvRow(['# project', row.projectName]),
    csvRow(['# design', row.designName]),
    csvRow(['# revision', revision.sequence]),
    csvRow(['# sha256', revision.sha256]),
    csvRow(['# engine', revision.engineVersion]),
    csvRow(present.map(([name]) => name)),
  ];
  for (let k = 0; k < w.t.length; k++) lines.push(csvRow(present.map(([, values]) => values![k])));
  return { revisionId: revision.id, designName: row.designName, sequence: revision.sequence, text: lines.join('\r\n') + '\r\n' };
}

export async function exportRevisionJson(ctx: AppContext, teamId: string, revisionId: string) {
  const row = await loadRevisionForExport(ctx, teamId, revisionId);
  const { revision } = row;
  const runs = await ctx.db
    .select()
    .from(analysisRuns)
    .where(eq(analysisRuns.revisionId, revision.id))
    .orderBy(asc(analysisRuns.createdAt), asc(analysisRuns.id));
  const reviewRows = await ctx.db
    .select()
    .from(reviews)
    .where(eq(reviews.revisionId, revision.id))
    .orderBy(asc(reviews.createdAt), asc(reviews.id));
  const people = await loadUsers(ctx.db, [revision.authorId, ...reviewRows.flatMap((r) => [r.reviewerId, r.requestedBy])]);
  return {
    format: 'ringwell-revision',
    formatVersion: 1,
    team: { name: row.teamName },
    project: { name: row.projectName },
    design: { id: row.designId, name: row.designName },
    revision: {
      id: revision.id,
      sequence: revision.sequence,
      sha256: revision.sha256,
      engineVersion: revision.engineVersion,
      createdAt: iso(revision.createdAt),
      author: userRef(people, revision.authorId),
      note: revision.note,
      isLatest: row.latestRevisionId === revision.id,
    },
    /** The design file exactly as hashed: SHA-256 of these UTF-8 bytes is revision.sha256. */
    canonicalJson: revision.designJson,
    designFile: JSON.parse(revision.designJson),
    policy: revision.policy,
    results: revision.results as CheckOutcome,
    analyses: runs.map((r) => ({
      kind: r.kind,
      options: r.options,
      optionsHash: r.optionsHash,
      engineVersion: r.engineVersion,
      createdAt: iso(r.createdAt),
      result: r.result,
    })),
    reviews: reviewRows.map((r) => ({
      id: r.id,
      reviewer: userRef(people, r.reviewerId),
      requestedBy: userRef(people, r.requestedBy),
      state: r.state,
      createdAt: iso(r.createdAt),
      decidedAt: isoOrNull(r.decidedAt),
      decisionReason: r.decisionReason,
      approvedSha256: r.approvedSha256,
      checksSnapshot: r.checksSnapshot,
    })),
  };
}
