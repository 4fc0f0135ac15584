import { ReviewsScreen } from '@/components/reviews/ReviewsScreen';

export default function ReviewsRoute() {
  return <ReviewsScreen />;
}
