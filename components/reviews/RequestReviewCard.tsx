import { useState } from 'react';
import { Pressable, View } from 'react-native';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Icon } from '@/components/ui/Icon';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { shortHash } from '@/components/ui/format';
import { describeError } from '@/lib/api/client';
import { requestReviewRequestSchema, type RevisionSummary } from '@/lib/contracts';
import { useMe } from '@/lib/queries/auth';
import { useRequestReview } from '@/lib/queries/reviews';
import { useMembers } from '@/lib/queries/team';
import { useTheme } from '@/lib/theme';

/** Ask one or more reviewers to sign off a revision, with a note on what to look at. */
export function RequestReviewCard({
  revision,
  designId,
  onDone,
}: {
  revision: RevisionSummary;
  designId: string;
  onDone?: () => void;
}) {
  const theme = useTheme();
  const me = useMe();
  const members = useMembers();
  const request = useRequestReview(revision.id, designId);
  const [chosen, setChosen] = useState<string[]>([]);
  const [note, setNote] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [sent, setSent] = useState(false);

  const reviewers = (members.data ?? []).filter(
    (m) => (m.role === 'reviewer' || m.role === 'admin') && m.userId !== me.data?.user.id,
  );

  const submit = () => {
    const parsed = requestReviewRequestSchema.safeParse({ reviewerIds: chosen, note: note.trim() });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message ?? 'Check the form.');
      return;
    }
    setError(null);
    request.mutate(parsed.data, {
      onSuccess: () => {
        setSent(true);
        onDone?.();
      },
    });
  };

  if (sent) {
    return (
      <Card title="Review requested" testID="review-requested">
        <Text>
          Revision {revision.sequence} ({shortHash(revision.sha256)}) is with{' '}
          {reviewers
            .filter((r) => chosen.includes(r.userId))
            .map((r) => r.name)
            .join(', ')}
          . They have an e-mail with a link to it.
        </Text>
      </Card>
    );
  }

  return (
    <Card
      title={`Request a review of revision ${revision.sequence}`}
      subtitle={`SHA-256 ${shortHash(revision.sha256)}. Reviewers see the checks as saved in this revision.`}
      testID="request-review-card"
    >
      {members.isPending ? (
        <Loading label="Loading the team" />
      ) : members.isError ? (
        <ErrorNotice error={members.error} onRetry={() => members.refetch()} />
      ) : reviewers.length === 0 ? (
        <Text muted>Nobody else in this team has the reviewer role. An admin can give it under Team.</Text>
      ) : (
        <View style={{ gap: theme.space.s }} role="group" accessibilityLabel="Reviewers">
          <Text variant="caption" weight="semibold" muted>
            Reviewers
          </Text>
          {reviewers.map((r) => {
            const on = chosen.includes(r.userId);
            return (
              <Pressable
                key={r.userId}
                accessibilityRole="checkbox"
                accessibilityState={{ checked: on }}
                accessibilityLabel={`${r.name}, ${r.role}`}
                testID={`reviewer-${r.email}`}
                onPress={() => setChosen((c) => (on ? c.filter((x) => x !== r.userId) : [...c, r.userId]))}
                style={{
                  minHeight: 44,
                  flexDirection: 'row',
                  alignItems: 'center',
                  gap: theme.space.m,
                  paddingHorizontal: theme.space.m,
                  borderWidth: 1,
                  borderRadius: theme.radius,
                  borderColor: on ? theme.color.accent : theme.color.hairline,
                  backgroundColor: on ? theme.color.accentSoft : theme.color.card,
                }}
              >
                <View
                  style={{
                    width: 20,
                    height: 20,
                    borderRadius: 4,
                    borderWidth: 2,
                    borderColor: on ? theme.color.accent : theme.color.mutedInk,
                    backgroundColor: on ? theme.color.accent : 'transparent',
                    alignItems: 'center',
                    justifyContent: 'center',
                  }}
                >
                  {on ? <Icon name="pass" size={14} color={theme.color.onAccent} /> : null}
                </View>
                <View style={{ flex: 1 }}>
                  <Text weight="semibold">{r.name}</Text>
                  <Text variant="caption" muted>
                    {r.email} · {r.role}
                  </Text>
                </View>
              </Pressable>
            );
          })}
        </View>
      )}
      <TextField
        label="Note for the reviewers"
        placeholder="Bypass closes at 95 %; please look at the second inrush."
        value={note}
        onChangeText={setNote}
        multiline
        testID="review-note"
      />
      {error ? (
        <Text color={theme.color.status.fail} accessibilityRole="alert">
          {error}
        </Text>
      ) : null}
      {request.isError ? (
        <Text color={theme.color.status.fail} accessibilityRole="alert">
          {describeError(request.error)}
        </Text>
      ) : null}
      <Button
        label="Request review"
        variant="primary"
        onPress={submit}
        busy={request.isPending}
        disabled={reviewers.length === 0}
        testID="submit-review-request"
        style={{ alignSelf: 'flex-start' }}
      />
    </Card>
  );
}
