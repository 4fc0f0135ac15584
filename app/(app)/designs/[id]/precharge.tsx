import { useLocalSearchParams } from 'expo-router';
import { PrechargeSizingScreen } from '@/components/precharge/PrechargeSizingScreen';

export default function PrechargeRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <PrechargeSizingScreen id={String(id)} />;
}
