import { useLocalSearchParams } from 'expo-router';
import { RevisionsScreen } from '@/components/reviews/RevisionsScreen';

export default function RevisionsRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <RevisionsScreen id={String(id)} />;
}
