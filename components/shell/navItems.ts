// The signed-in app's destinations, in order. A later screen (spread, stability, bench captures…)
// slots in by adding one entry here; the rail and the tab bar both read this list.
import type { IconName } from '@/components/ui/Icon';

export interface NavItem {
  key: string;
  label: string;
  href: string;
  icon: IconName;
  /** Which paths count as being inside this destination. */
  matches: (pathname: string) => boolean;
}

export const navItems: NavItem[] = [
  { key: 'designs', label: 'Designs', href: '/designs', icon: 'designs', matches: (p) => p === '/' || p.startsWith('/designs') },
  { key: 'parts', label: 'Parts', href: '/parts', icon: 'parts', matches: (p) => p.startsWith('/parts') },
  { key: 'reviews', label: 'Reviews', href: '/reviews', icon: 'reviews', matches: (p) => p.startsWith('/reviews') },
  { key: 'team', label: 'Team', href: '/team', icon: 'team', matches: (p) => p.startsWith('/team') },
];
