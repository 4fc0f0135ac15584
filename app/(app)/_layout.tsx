import { Redirect, Slot, usePathname } from 'expo-router';
import { View } from 'react-native';
import { AppShell } from '@/components/shell/AppShell';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { useMe } from '@/lib/queries/auth';

export default function SignedInLayout() {
  const me = useMe();
  const pathname = usePathname();
  if (me.isPending) return <Loading label="Checking your session" />;
  if (me.isError) {
    return (
      <View style={{ padding: 24 }}>
        <ErrorNotice error={me.error} onRetry={() => me.refetch()} />
      </View>
    );
  }
  if (!me.data)
    return <Redirect href={{ pathname: '/sign-in', params: pathname && pathname !== '/' ? { next: pathname } : {} }} />;
  return (
    <AppShell me={me.data}>
      <Slot />
    </AppShell>
  );
}
