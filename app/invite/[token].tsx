import { useLocalSearchParams } from 'expo-router';
import { InviteScreen } from '@/components/auth/InviteScreen';

export default function InviteRoute() {
  const { token } = useLocalSearchParams<{ token: string }>();
  return <InviteScreen token={String(token)} />;
}
