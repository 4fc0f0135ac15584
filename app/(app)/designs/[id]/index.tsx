import { useLocalSearchParams } from 'expo-router';
import { DesignEditorScreen } from '@/components/designs/DesignEditorScreen';

export default function DesignRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <DesignEditorScreen id={String(id)} />;
}
