import { useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { ChecksTable, type CheckRow } from '@/components/checks/ChecksTable';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { StatusBadge } from '@/components/ui/StatusBadge';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Screen } from '@/components/ui/Screen';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { shortHash, stampText } from '@/components/ui/format';
import { describeError } from '@/lib/api/client';
import { addCommentRequestSchema, requestChangesRequestSchema, type ReviewComment, type ReviewDetail } from '@/lib/contracts';
import { useMe } from '@/lib/queries/auth';
import { useAddComment, useApproveReview, useRequestChanges, useReview } from '@/lib/queries/reviews';
import { useLayout, useTheme } from '@/lib/theme';
import { DownloadButtons } from './DownloadButtons';
import { REVIEW_WORD } from './reviewWords';

/** The reviewer's view of one revision: failures first, a comment per check, and the decision. */
export function ReviewScreen({ id }: { id: string }) {
  const review = useReview(id);
  if (review.isPending) return <Loading label="Opening the review" />;
  if (review.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={review.error} onRetry={() => review.refetch()} title="This review could not be opened." />
      </View>
    );
  return <Review review={review.data} />;
}

function Review({ review }: { review: ReviewDetail }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const me = useMe();
  const role = me.data?.teams.find((t) => t.id === review.teamId)?.role;
  const mayComment = role === 'engineer' || role === 'reviewer' || role === 'admin';
  const w = REVIEW_WORD[review.state];
  const comments = review.comments;
  const byCheck = (checkId: string | null) => comments.filter((c) => c.checkId === checkId);

  return (
    <Screen
      title={`Review: ${review.designName}`}
      subtitle={`${review.projectName} · revision ${review.revisionSequence} · sha256 ${shortHash(review.revisionSha256)}`}
      testID="review-screen"
      actions={
        <Button
          label="Open the design"
          icon="designs"
          onPress={() => router.push(`/designs/${review.designId}` as never)}
          compact={!layout.isNarrow}
        />
      }
    >
      <Card>
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s, alignItems: 'center' }}>
          <Chip label={w.label} tone={w.tone} icon={w.icon} testID="review-state" />
          <Text variant="caption" muted>
            Requested by {review.requestedBy?.name ?? '—'} on {stampText(review.createdAt)} · reviewer{' '}
            {review.reviewer?.name ?? '—'}
          </Text>
        </View>
        {review.note ? (
          <View style={{ borderLeftWidth: 3, borderLeftColor: theme.color.accent, paddingLeft: theme.space.m }}>
            <Text variant="caption" muted>
              Note from {review.requestedBy?.name ?? 'the engineer'}
            </Text>
            <Text>{review.note}</Text>
          </View>
        ) : null}
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.l }} accessibilityLabel="Counts by status">
          {(['fail', 'warn', 'not-checked', 'pass'] as const).map((s) => (
            <View key={s} style={{ flexDirection: 'row', gap: 6, alignItems: 'center' }}>
              <StatusBadge status={s} size="caption" />
              <Text mono variant="caption">
                {review.counts[s] ?? 0}
              </Text>
            </View>
          ))}
        </View>
        {review.state === 'approved' && review.approvedSha256 ? (
          <Text variant="caption" testID="approved-hash">
            Approved {review.decidedAt ? stampText(review.decidedAt) : ''} for sha256{' '}
            <Text mono variant="caption">
              {review.approvedSha256}
            </Text>
          </Text>
        ) : null}
        {review.decisionReason ? <Text>Reason: {review.decisionReason}</Text> : null}
        <DownloadButtons revisionId={review.revisionId} designName={review.designName} sequence={review.revisionSequence} />
      </Card>

      {review.canDecide && review.state === 'requested' ? <DecisionCard review={review} /> : null}

      <Card title="Checks of this revision" subtitle="As saved with the revision; failures first. Comment on any check.">
        <ChecksTable
          checks={review.checks as CheckRow[]}
          renderDetail={(c) => (
            <CheckComments
              reviewId={review.id}
              checkId={c.id}
              comments={byCheck(c.id)}
              mayComment={mayComment && review.state !== 'superseded'}
            />
          )}
        />
      </Card>

      <Card title="General comments">
        <CheckComments
          reviewId={review.id}
          checkId={null}
          comments={byCheck(null)}
          mayComment={mayComment && review.state !== 'superseded'}
        />
      </Card>
    </Screen>
  );
}

function CheckComments({
  reviewId,
  checkId,
  comments,
  mayComment,
}: {
  reviewId: string;
  checkId: string | null;
  comments: ReviewComment[];
  mayComment: boolean;
}) {
  const theme = useTheme();
  const add = useAddComment(reviewId);
  const [open, setOpen] = useState(false);
  const [body, setBody] = useState('');
  const [error, setError] = useState<string | null>(null);
  const submit = () => {
    const parsed = addCommentRequestSchema.safeParse({ body, ...(checkId ? { checkId } : {}) });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message ?? 'Write a comment.');
      return;
    }
    setError(null);
    add.mutate(parsed.data, {
      onSuccess: () => {
        setBody('');
        setOpen(false);
      },
    });
  };
  return (
    <View style={{ gap: 4 }}>
      {comments.map((c) => (
        <View key={c.id} style={{ borderLeftWidth: 2, borderLeftColor: theme.color.hairline, paddingLeft: theme.space.s }}>
          <Text variant="caption" muted>
            {c.author?.name ?? 'A former member'} · {stampText(c.createdAt)}
          </Text>
          <Text variant="body">{c.body}</Text>
        </View>
      ))}
      {mayComment ? (
        open ? (
          <View style={{ gap: theme.space.s }}>
            <TextField
              label={checkId ? 'Comment on this check' : 'Comment on the revision'}
              value={body}
              onChangeText={setBody}
              multiline
              error={error ?? (add.isError ? describeError(add.error) : undefined)}
              testID={`comment-input-${checkId ?? 'general'}`}
            />
            <View style={{ flexDirection: 'row', gap: theme.space.s }}>
              <Button
                label="Add comment"
                compact
                variant="primary"
                onPress={submit}
                busy={add.isPending}
                testID={`comment-submit-${checkId ?? 'general'}`}
              />
              <Button label="Cancel" compact variant="quiet" onPress={() => setOpen(false)} />
            </View>
          </View>
        ) : (
          <Button
            label={comments.length ? 'Reply' : 'Comment'}
            compact
            variant="quiet"
            onPress={() => setOpen(true)}
            style={{ alignSelf: 'flex-start' }}
            testID={`comment-open-${checkId ?? 'general'}`}
            accessibilityLabel={checkId ? `Comment on check ${checkId}` : 'Comment on the revision'}
          />
        )
      ) : null}
    </View>
  );
}

function DecisionCard({ review }: { review: ReviewDetail }) {
  const theme = useTheme();
  const approve = useApproveReview(review.id);
  const changes = useRequestChanges(review.id);
  const [comment, setComment] = useState('');
  const [reason, setReason] = useState('');
  const [reasonError, setReasonError] = useState<string | null>(null);
  const failing = (review.counts.fail ?? 0) > 0;
  const requestChanges = () => {
    const parsed = requestChangesRequestSchema.safeParse({ reason });
    if (!parsed.success) {
      setReasonError(parsed.error.issues[0]?.message ?? 'Say what needs to change.');
      return;
    }
    setReasonError(null);
    changes.mutate(parsed.data);
  };
  const failure = approve.error ?? changes.error;
  return (
    <Card
      title="Your decision"
      subtitle="The decision records this revision's hash and its checks as they are now."
      testID="decision-card"
    >
      {failing ? (
        <Text color={theme.color.status.fail}>
          {review.counts.fail} check{review.counts.fail === 1 ? '' : 's'} fail in this revision. Approving signs off the design
          with those failures on record.
        </Text>
      ) : null}
      <TextField
        label="Comment with the approval (optional)"
        value={comment}
        onChangeText={setComment}
        multiline
        testID="approve-comment"
      />
      <Button
        label="Approve"
        variant="primary"
        icon="pass"
        onPress={() => approve.mutate({ comment: comment.trim() })}
        busy={approve.isPending}
        testID="approve"
        style={{ alignSelf: 'flex-start' }}
      />
      <View style={{ height: 1, backgroundColor: theme.color.hairline }} />
      <TextField
        label="What needs to change"
        value={reason}
        onChangeText={setReason}
        multiline
        error={reasonError ?? undefined}
        testID="changes-reason"
      />
      <Button
        label="Request changes"
        variant="danger"
        icon="warn"
        onPress={requestChanges}
        busy={changes.isPending}
        testID="request-changes"
        style={{ alignSelf: 'flex-start' }}
      />
      {failure ? (
        <Text color={theme.color.status.fail} accessibilityRole="alert">
          {describeError(failure)}
        </Text>
      ) : null}
    </Card>
  );
}
