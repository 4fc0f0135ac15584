import { Redirect, useLocalSearchParams } from 'expo-router';
import { SignInScreen } from '@/components/auth/SignInScreen';
import { Loading } from '@/components/ui/States';
import { useMe } from '@/lib/queries/auth';

export default function SignInRoute() {
  const me = useMe();
  const { next } = useLocalSearchParams<{ next?: string }>();
  if (me.isPending) return <Loading label="Checking your session" />;
  if (me.data) return <Redirect href={(typeof next === 'string' && next.startsWith('/') ? next : '/designs') as never} />;
  return <SignInScreen />;
}
