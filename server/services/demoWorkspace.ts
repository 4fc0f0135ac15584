// The demo workspace of a first start (DESIGN.md's Northfold Motion): projects and designs built
// from the engine's presets, one saved revision each, and the depot charger's DC link under review
// (requested by Sam, the engineer, from Priya, the reviewer). Runs through the real services, so the
// revisions are hashed and checked and the review e-mail lands in the outbox.
import { inArray } from 'drizzle-orm';
import { users } from '../../db/schema';
import { demoAccounts } from '../../db/seed';
import type { AppContext } from '../context';
import { createDesign } from './designs';
import { listPresets } from './engine';
import { createProject } from './projects';
import { requestReview } from './reviews';
import { saveRevision } from './revisions';

interface DemoDesign {
  project: string;
  name: string;
  description: string;
  /** Words that pick the preset by id or title. */
  preset: RegExp;
  review?: string;
}

const DEMO_PROJECTS: Record<string, string> = {
  'Depot charger': 'The 800 V depot charger: DC link, precharge and bleeder.',
  'Light vehicles': 'Battery front ends of the cargo bike and the scooter.',
  'Power stage lab': 'Switching transients measured on the bench.',
};

const DEMO_DESIGNS: DemoDesign[] = [
  {
    project: 'Depot charger',
    name: 'Depot charger DC link, 800 V',
    description: '940 µF behind a precharge resistor and a bypass contactor, with a bleeder.',
    preset: /depot|800/i,
    review: 'First full check of the DC link. Please look at the bypass inrush and the discharge time.',
  },
  {
    project: 'Light vehicles',
    name: 'Cargo-bike drive, 96 V',
    description: 'LC input filter in front of the 1.2 kW motor inverter.',
    preset: /cargo|96/i,
  },
  {
    project: 'Light vehicles',
    name: 'Scooter controller, 48 V',
    description: 'Battery hot-plug onto 1.5 mF of low-ESR capacitors, no precharge.',
    preset: /scooter|48/i,
  },
  {
    project: 'Power stage lab',
    name: 'Gate-drive test, 600 V',
    description: '40 A turn-off through 25 nH of loop inductance, with an RC snubber.',
    preset: /gate|600/i,
  },
  {
    project: 'Light vehicles',
    name: 'Wall charger front end, 230 V',
    description: 'Bridge rectifier onto 470 µF from 230 V mains, inrush limited by a 10 Ω NTC.',
    preset: /mains-wall-charger/i,
  },
];

export async function seedDemoWorkspace(ctx: AppContext, teamId: string): Promise<void> {
  const people = await ctx.db
    .select()
    .from(users)
    .where(
      inArray(
        users.email,
        demoAccounts.map((a) => a.email),
      ),
    );
  const byRole = (role: string) => {
    const email = demoAccounts.find((a) => a.role === role)?.email;
    return people.find((p) => p.email === email);
  };
  const engineer = byRole('engineer');
  const reviewer = byRole('reviewer');
  if (!engineer || !reviewer) return;
  const audit = { actor: { id: engineer.id, email: engineer.email }, ip: null };
  const presets = listPresets();
  const projectIds = new Map<string, string>();
  for (const [name, description] of Object.entries(DEMO_PROJECTS)) {
    projectIds.set(name, (await createProject(ctx, teamId, engineer.id, { name, description }, audit)).id);
  }
  for (const demo of DEMO_DESIGNS) {
    const preset = presets.find((p) => demo.preset.test(p.id) || demo.preset.test(p.title));
    if (!preset) {
      ctx.log(`demo workspace: no engine preset for "${demo.name}"; skipped`);
      continue;
    }
    const design = await createDesign(
      ctx,
      teamId,
      engineer.id,
      { projectId: projectIds.get(demo.project)!, name: demo.name, description: demo.description, presetId: preset.id },
      audit,
    );
    const revision = await saveRevision(ctx, teamId, design.id, engineer.id, { note: 'First revision, from the preset.' }, audit);
    if (demo.review) {
      await requestReview(
        ctx,
        teamId,
        revision.id,
        { id: engineer.id, email: engineer.email, name: engineer.name },
        { reviewerIds: [reviewer.id], note: demo.review },
        audit,
      );
    }
  }
}
