import { useLocalSearchParams } from 'expo-router';
import { SpreadScreen } from '@/components/spread/SpreadScreen';

export default function SpreadRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <SpreadScreen id={String(id)} />;
}
