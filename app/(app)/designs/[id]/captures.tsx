import { useLocalSearchParams } from 'expo-router';
import { CapturesScreen } from '@/components/captures/CapturesScreen';

export default function CapturesRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <CapturesScreen id={String(id)} />;
}
