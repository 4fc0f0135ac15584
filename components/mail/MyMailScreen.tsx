import { Button } from '@/components/ui/Button';
import { EmptyState, ErrorNotice, Loading } from '@/components/ui/States';
import { Screen } from '@/components/ui/Screen';
import { useMyMail } from '@/lib/queries/team';
import { MailList } from './MailList';

/** The signed-in person's messages from this install's local mail outbox. */
export function MyMailScreen() {
  const mail = useMyMail();
  return (
    <Screen
      title="My mail"
      subtitle="Messages Ringwell sent to you: review requests, decisions, invitations."
      testID="my-mail-screen"
      actions={
        <Button
          label="Refresh"
          compact
          onPress={() => mail.refetch()}
          busy={mail.isFetching && !mail.isPending}
          testID="mail-refresh"
        />
      }
    >
      {mail.isPending ? (
        <Loading label="Loading your mail" />
      ) : mail.isError ? (
        <ErrorNotice error={mail.error} onRetry={() => mail.refetch()} />
      ) : mail.data.length === 0 ? (
        <EmptyState
          icon="mail"
          title="No messages."
          text="When someone asks you for a review or decides on yours, the e-mail appears here."
        />
      ) : (
        <MailList messages={mail.data} />
      )}
    </Screen>
  );
}
