import type { ReviewState } from '@/lib/contracts';
import type { IconName } from '@/components/ui/Icon';

export const REVIEW_WORD: Record<ReviewState, { label: string; tone: 'accent' | 'pass' | 'warn' | 'neutral'; icon: IconName }> = {
  requested: { label: 'waiting for review', tone: 'accent', icon: 'reviews' },
  approved: { label: 'approved', tone: 'pass', icon: 'pass' },
  'changes-requested': { label: 'changes requested', tone: 'warn', icon: 'warn' },
  superseded: { label: 'superseded by a newer revision', tone: 'neutral', icon: 'not-checked' },
};
