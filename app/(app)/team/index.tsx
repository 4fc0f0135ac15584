import { TeamScreen } from '@/components/admin/TeamScreen';

export default function TeamRoute() {
  return <TeamScreen />;
}
