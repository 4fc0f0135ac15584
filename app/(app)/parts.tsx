import { PartsLibraryScreen } from '@/components/parts/PartsLibraryScreen';

export default function PartsRoute() {
  return <PartsLibraryScreen />;
}
