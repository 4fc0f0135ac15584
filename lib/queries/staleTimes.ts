// How long each kind of data is taken as fresh before react-query fetches it again. One place, so
// that a reader sees at once what refreshes often and what barely changes.
export const STALE = {
  /** Who is signed in, their teams and roles. */
  me: 5 * 60_000,
  /** Lists that other people change (designs, reviews). */
  list: 30_000,
  /** One design's working copy; the editor owns it while open. */
  design: 60_000,
  /** Revisions and analysis results never change once written. */
  immutable: Infinity,
  /** Mail, the outbox and the audit log: new entries arrive while a screen is open. */
  feed: 10_000,
  /** Presets, the derating policy and the demo-account offer. */
  config: 10 * 60_000,
} as const;
