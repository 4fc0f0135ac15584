// The team's derating policy: overrides of the engine's defaults, edited by admins. Revisions keep
// the policy they were judged against, so a later change never alters a saved revision's margins.
import { eq } from 'drizzle-orm';
import { teams, type Team } from '../../db/schema';
import type { DeratingResponse } from '../../lib/contracts/team';
import type { AppContext } from '../context';
import { recordAudit, type AuditEntry } from './audit';
import { effectivePolicy, requireValidTeamPolicy } from './engine';
import { isoOrNull } from './shape';

export function getDerating(team: Team): DeratingResponse {
  return {
    policy: team.deratingPolicy ?? null,
    effective: effectivePolicy(team.deratingPolicy),
    updatedAt: isoOrNull(team.deratingUpdatedAt),
  };
}

export async function putDerating(
  ctx: AppContext,
  teamId: string,
  input: unknown,
  audit: Pick<AuditEntry, 'actor' | 'ip'>,
): Promise<DeratingResponse> {
  const policy = requireValidTeamPolicy(input);
  const updated = await ctx.db.transaction(async (tx) => {
    const [before] = await tx.select({ policy: teams.deratingPolicy }).from(teams).where(eq(teams.id, teamId));
    const [row] = await tx
      .update(teams)
      .set({ deratingPolicy: policy, deratingUpdatedAt: new Date() })
      .where(eq(teams.id, teamId))
      .returning();
    await recordAudit(tx, {
      ...audit,
      action: 'derating.changed',
      teamId,
      entity: { type: 'team', id: teamId },
      details: { before: before?.policy ?? null, after: policy },
    });
    return row;
  });
  return getDerating(updated);
}

export async function teamPolicyOverrides(ctx: AppContext, teamId: string): Promise<unknown> {
  const [team] = await ctx.db.select({ policy: teams.deratingPolicy }).from(teams).where(eq(teams.id, teamId));
  return team?.policy ?? null;
}
