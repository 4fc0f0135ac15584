import { useLocalSearchParams } from 'expo-router';
import { MainsScreen } from '@/components/mains/MainsScreen';

export default function MainsRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <MainsScreen id={String(id)} />;
}
