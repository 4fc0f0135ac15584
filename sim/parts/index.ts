// Parts: the team's shared component ratings, their CSV form, and how a design takes a part.
// See README.md in this folder.
export {
  KIND_FIELDS,
  KIND_LABELS,
  PART_FIELD_KEYS,
  PART_FIELDS,
  PART_KINDS,
  parsePart,
  partSchema,
  safeParsePart,
  type Part,
  type PartField,
  type PartInput,
  type PartKind,
  type PartOf,
  type SafeParsePart,
} from './schema';
export {
  PARTS_CSV_COLUMNS,
  PARTS_CSV_MAX_BYTES,
  escapeCell,
  exportPartsCsv,
  importPartsCsv,
  partsCsvTemplate,
  unescapeCell,
  type PartCsvError,
  type PartsCsvColumn,
  type PartsImport,
} from './csv';
export {
  PART_SLOT_KEYS,
  PART_SLOTS,
  applyPartToDesign,
  partReference,
  ratingCitations,
  type AppliedPart,
  type PartRefs,
  type PartSlot,
  type RatingCitation,
} from './apply';
export { demoParts } from './demo';
