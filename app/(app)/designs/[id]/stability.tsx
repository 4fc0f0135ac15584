import { useLocalSearchParams } from 'expo-router';
import { StabilityScreen } from '@/components/stability/StabilityScreen';

export default function StabilityRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <StabilityScreen id={String(id)} />;
}
