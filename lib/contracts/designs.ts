// Projects, designs, revisions, analyses and the stateless check. The design JSON itself is the
// engine's (sim/design.ts); here it travels as opaque JSON and the server validates it with the
// engine's schema when a revision is saved or a check is run.
import { z } from 'zod';
import {
  checkStatusSchema,
  designStatusSchema,
  idSchema,
  paginationQuerySchema,
  queryBooleanSchema,
  userRefSchema,
} from './common';

const nameSchema = z.string().trim().min(1, 'Enter a name.').max(160);
const descriptionSchema = z.string().max(4000);
/** Any JSON value except undefined (the working copy may be half-edited and invalid). */
const jsonValueSchema = z.custom<unknown>((value) => value !== undefined, 'Send a JSON value.');

// ---------- projects ----------
export const createProjectRequestSchema = z.object({ name: nameSchema, description: descriptionSchema.default('') });
export type CreateProjectRequest = z.input<typeof createProjectRequestSchema>;

export const updateProjectRequestSchema = z
  .object({ name: nameSchema, description: descriptionSchema, archived: z.boolean() })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Send at least one of name, description, archived.');
export type UpdateProjectRequest = z.infer<typeof updateProjectRequestSchema>;

export const listProjectsQuerySchema = paginationQuerySchema.extend({
  /** Case-insensitive substring of the name. */
  search: z.string().trim().max(160).optional(),
  archived: queryBooleanSchema.optional(),
});
export type ListProjectsQuery = z.input<typeof listProjectsQuerySchema>;

export const projectSchema = z.object({
  id: idSchema,
  teamId: idSchema,
  name: z.string(),
  description: z.string(),
  designCount: z.number().int(),
  createdBy: userRefSchema,
  createdAt: z.string(),
  updatedAt: z.string(),
  archivedAt: z.string().nullable(),
});
export type Project = z.infer<typeof projectSchema>;

// ---------- designs ----------
export const reviewStateOfDesignSchema = z.enum(['none', 'requested', 'approved', 'changes-requested']);
export type DesignReviewState = z.infer<typeof reviewStateOfDesignSchema>;

export const createDesignRequestSchema = z.object({
  projectId: idSchema,
  name: nameSchema,
  description: descriptionSchema.default(''),
  /** Start from one of the engine's presets (GET /api/presets); its design becomes the draft. */
  presetId: z.string().max(100).optional(),
  /** The working copy; when absent the preset's design (or an empty object) is used. */
  draft: jsonValueSchema.optional(),
});
export type CreateDesignRequest = z.input<typeof createDesignRequestSchema>;

export const updateDesignRequestSchema = z
  .object({
    name: nameSchema,
    description: descriptionSchema,
    projectId: idSchema,
    draft: jsonValueSchema,
    archived: z.boolean(),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Send at least one field to change.');
export type UpdateDesignRequest = z.infer<typeof updateDesignRequestSchema>;

export const listDesignsQuerySchema = paginationQuerySchema.extend({
  projectId: idSchema.optional(),
  status: designStatusSchema.optional(),
  reviewState: reviewStateOfDesignSchema.optional(),
  /** Case-insensitive substring of the design's name. */
  search: z.string().trim().max(160).optional(),
  archived: queryBooleanSchema.optional(),
});
export type ListDesignsQuery = z.input<typeof listDesignsQuerySchema>;

export const validationIssueSchema = z.object({ path: z.string(), message: z.string() });

export const designSummarySchema = z.object({
  id: idSchema,
  teamId: idSchema,
  projectId: idSchema,
  projectName: z.string(),
  name: z.string(),
  description: z.string(),
  presetId: z.string().nullable(),
  status: designStatusSchema,
  reviewState: reviewStateOfDesignSchema,
  revisionCount: z.number().int(),
  latestRevisionId: idSchema.nullable(),
  createdBy: userRefSchema,
  createdAt: z.string(),
  updatedAt: z.string(),
  archivedAt: z.string().nullable(),
});
export type DesignSummary = z.infer<typeof designSummarySchema>;

export const designDetailSchema = designSummarySchema.extend({
  draft: z.unknown(),
  draftUpdatedAt: z.string(),
  /** Whether the working copy would save as a revision, with the engine's issues if not. */
  draftValidation: z.object({ valid: z.boolean(), issues: z.array(validationIssueSchema) }),
  latestRevision: z.lazy(() => revisionSummarySchema).nullable(),
});
export type DesignDetail = z.infer<typeof designDetailSchema>;

// ---------- checks (the engine's shapes, as the API returns them) ----------
export const checkResultSchema = z.looseObject({
  id: z.string(),
  label: z.string(),
  value: z.number().nullable(),
  limit: z.number().nullable(),
  deratedLimit: z.number().nullable(),
  marginPercent: z.number().nullable(),
  status: checkStatusSchema,
  basis: z.string(),
  unit: z.string(),
  message: z.string(),
});
export type CheckResult = z.infer<typeof checkResultSchema>;

export const noticeSchema = z.looseObject({ id: z.string(), title: z.string(), text: z.string(), severity: z.string() });
export type Notice = z.infer<typeof noticeSchema>;

export const checkSummarySchema = z.object({
  pass: z.number().int(),
  warn: z.number().int(),
  fail: z.number().int(),
  notChecked: z.number().int(),
  worst: checkStatusSchema,
});
export type CheckSummary = z.infer<typeof checkSummarySchema>;

/** What a revision stores from its check, and what POST /api/check returns (plus the waveform). */
export const checkOutcomeSchema = z.object({
  engineVersion: z.string(),
  metrics: z.record(z.string(), z.unknown()),
  solvers: z.unknown(),
  checks: z.array(checkResultSchema),
  notices: z.array(noticeSchema),
  summary: checkSummarySchema,
  warnings: z.array(z.unknown()),
  worstStatus: designStatusSchema,
});
export type CheckOutcome = z.infer<typeof checkOutcomeSchema>;

export const waveformSchema = z.object({
  t: z.array(z.number()),
  vC: z.array(z.number()),
  v: z.array(z.number()),
  i: z.array(z.number()),
  vD: z.array(z.number()).nullable().optional(),
  prechargePower: z.array(z.number()).nullable().optional(),
});

// ---------- revisions ----------
export const createRevisionRequestSchema = z.object({
  /** What changed, for the record. */
  note: z.string().max(4000).default(''),
  /** The design to save; when absent the design's current working copy is saved. */
  design: jsonValueSchema.optional(),
});
export type CreateRevisionRequest = z.input<typeof createRevisionRequestSchema>;

export const revisionSummarySchema = z.object({
  id: idSchema,
  designId: idSchema,
  sequence: z.number().int(),
  sha256: z.string(),
  engineVersion: z.string(),
  worstStatus: designStatusSchema,
  note: z.string(),
  author: userRefSchema,
  createdAt: z.string(),
});
export type RevisionSummary = z.infer<typeof revisionSummarySchema>;

export const revisionDetailSchema = revisionSummarySchema.extend({
  teamId: idSchema,
  /** The validated design exactly as hashed (parsed from the canonical text). */
  design: z.unknown(),
  /** The canonical serialisation; SHA-256 of these UTF-8 bytes is `sha256`. */
  canonicalJson: z.string(),
  policy: z.unknown(),
  results: checkOutcomeSchema,
  isLatest: z.boolean(),
  analyses: z.array(z.lazy(() => analysisRunSummarySchema)),
});
export type RevisionDetail = z.infer<typeof revisionDetailSchema>;

export const listRevisionsQuerySchema = paginationQuerySchema;

/** GET /api/revisions/:id/verify: recompute the hash and the check, compare with what is stored. */
export const verifyRevisionResponseSchema = z.object({
  revisionId: idSchema,
  sha256: z.string(),
  hashMatches: z.boolean(),
  reproduced: z.boolean(),
  storedEngineVersion: z.string(),
  currentEngineVersion: z.string(),
  differences: z.array(z.object({ path: z.string(), stored: z.unknown(), recomputed: z.unknown() })),
});
export type VerifyRevisionResponse = z.infer<typeof verifyRevisionResponseSchema>;

// ---------- analyses ----------
export const analysisKinds = ['check', 'precharge', 'spread', 'stability', 'snubber', 'mains-sweep', 'mains-cold-hot'] as const;
export const analysisKindSchema = z.enum(analysisKinds);
export type AnalysisKind = z.infer<typeof analysisKindSchema>;

export const runAnalysisRequestSchema = z.object({
  kind: analysisKindSchema,
  /** Options of the analysis (each kind validates its own); {} for the defaults. */
  options: z.record(z.string(), z.unknown()).default({}),
});
export type RunAnalysisRequest = z.input<typeof runAnalysisRequestSchema>;

export const analysisRunSummarySchema = z.object({
  id: idSchema,
  revisionId: idSchema,
  kind: analysisKindSchema,
  optionsHash: z.string(),
  options: z.unknown(),
  engineVersion: z.string(),
  durationMs: z.number(),
  createdAt: z.string(),
});
export const analysisRunSchema = analysisRunSummarySchema.extend({
  result: z.unknown(),
  /** True when the answer came from the cache (same revision, kind and options). */
  cached: z.boolean(),
});
export type AnalysisRun = z.infer<typeof analysisRunSchema>;

// ---------- stateless computations ----------
export const checkRequestSchema = z.object({
  design: jsonValueSchema,
  /** Number of waveform points to return (the engine's default when absent). */
  points: z.number().int().min(16).max(20000).optional(),
  /** Leave the waveform out of the answer (the summary strip only needs the margins). */
  includeWaveform: z.boolean().default(true),
});
export type CheckRequest = z.input<typeof checkRequestSchema>;

export const checkResponseSchema = checkOutcomeSchema.extend({ waveform: waveformSchema.nullable(), phases: z.unknown() });
export type CheckResponse = z.infer<typeof checkResponseSchema>;

/** POST /api/precharge/size takes the engine's prechargeSizingSchema input (validated there). */
export const prechargeSizeRequestSchema = z.record(z.string(), z.unknown());

export const presetSchema = z.object({ id: z.string(), title: z.string(), summary: z.string(), design: z.unknown() });
export type Preset = z.infer<typeof presetSchema>;
