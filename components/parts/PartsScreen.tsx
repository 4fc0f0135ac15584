import { EmptyState } from '@/components/ui/States';
import { Screen } from '@/components/ui/Screen';

/** Shared component ratings arrive in a later release; until then ratings live in each design. */
export function PartsScreen() {
  return (
    <Screen title="Parts" subtitle="Shared component ratings for the team." testID="parts-screen">
      <EmptyState
        icon="parts"
        title="The parts library is coming in a later release."
        text="Until then, enter each part's ratings in the design's Ratings group; they are saved with every revision and used for its margins."
      />
    </Screen>
  );
}
