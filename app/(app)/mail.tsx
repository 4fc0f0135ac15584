import { MyMailScreen } from '@/components/mail/MyMailScreen';

export default function MailRoute() {
  return <MyMailScreen />;
}
