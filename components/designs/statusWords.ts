import type { DesignReviewState, DesignStatus } from '@/lib/contracts';
import type { IconName } from '@/components/ui/Icon';
import type { StatusKind } from '@/lib/theme';

export const DESIGN_STATUS: Record<DesignStatus, { label: string; tone: StatusKind | 'neutral'; icon: IconName }> = {
  pass: { label: 'passes', tone: 'pass', icon: 'pass' },
  warn: { label: 'warnings', tone: 'warn', icon: 'warn' },
  fail: { label: 'failures', tone: 'fail', icon: 'fail' },
  'not-checked': { label: 'not checked', tone: 'not-checked', icon: 'not-checked' },
  'not-run': { label: 'no revision yet', tone: 'neutral', icon: 'not-checked' },
};

export const REVIEW_STATE: Record<
  DesignReviewState,
  { label: string; tone: 'accent' | 'pass' | 'warn' | 'neutral'; icon: IconName } | null
> = {
  none: null,
  requested: { label: 'under review', tone: 'accent', icon: 'reviews' },
  approved: { label: 'approved', tone: 'pass', icon: 'pass' },
  'changes-requested': { label: 'changes requested', tone: 'warn', icon: 'warn' },
};
