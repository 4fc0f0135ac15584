import { useLocalSearchParams } from 'expo-router';
import { SnubberScreen } from '@/components/snubber/SnubberScreen';

export default function SnubberRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <SnubberScreen id={String(id)} />;
}
