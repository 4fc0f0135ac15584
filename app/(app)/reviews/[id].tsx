import { useLocalSearchParams } from 'expo-router';
import { ReviewScreen } from '@/components/reviews/ReviewScreen';

export default function ReviewRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <ReviewScreen id={String(id)} />;
}
