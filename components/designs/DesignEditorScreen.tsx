import { useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { ScrollView, View } from 'react-native';
import { ResultsPanel } from '@/components/results/ResultsPanel';
import { SummaryStrip } from '@/components/results/SummaryStrip';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { Segmented } from '@/components/ui/Segmented';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { shortHash } from '@/components/ui/format';
import { describeError } from '@/lib/api/client';
import type { DesignDetail, RevisionDetail } from '@/lib/contracts';
import { can, useMe } from '@/lib/queries/auth';
import { useDesign, useSaveRevision } from '@/lib/queries/designs';
import { useDerating } from '@/lib/queries/team';
import { useLayout, useTheme } from '@/lib/theme';
import { CircuitSketch } from './CircuitSketch';
import { sketchParts, type Draft } from './designForm';
import { EditorForm } from './EditorForm';
import { isMainsDraft } from './MainsSection';
import { DESIGN_STATUS, REVIEW_STATE } from './statusWords';
import { useDraft, type SaveState } from './useDraft';
import { PartPicker } from '@/components/parts/PartPicker';
import { useLiveCheck } from './useLiveCheck';

export function DesignEditorScreen({ id }: { id: string }) {
  const design = useDesign(id);
  if (design.isPending) return <Loading label="Opening the design" />;
  if (design.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={design.error} onRetry={() => design.refetch()} title="This design could not be opened." />
      </View>
    );
  return <Editor key={design.data.id} design={design.data} />;
}

function asDraft(value: unknown): Draft {
  return value && typeof value === 'object' && !Array.isArray(value) ? (value as Draft) : {};
}

function saveText(s: SaveState): string {
  switch (s.kind) {
    case 'saved':
      return 'Working copy saved';
    case 'dirty':
      return 'Changes not yet saved';
    case 'saving':
      return 'Saving…';
    case 'failed':
      return `Not saved: ${s.message}`;
  }
}

function Editor({ design }: { design: DesignDetail }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const me = useMe();
  const role = me.data?.teams.find((t) => t.id === design.teamId)?.role;
  const mayEdit = can(role, 'edit');
  const derating = useDerating();
  const teamPolicy = derating.data?.policy ?? null;
  const d = useDraft(design.id, asDraft(design.draft));
  const live = useLiveCheck(d.draft, teamPolicy);
  const [pane, setPane] = useState<'results' | 'inputs'>('results');
  const [saving, setSaving] = useState(false);
  const parts = useMemo(() => sketchParts(d.draft), [d.draft]);

  const staleText = live.issues.length
    ? `The inputs have ${live.issues.length === 1 ? 'a problem' : `${live.issues.length} problems`}; the figures are from the last inputs that worked.`
    : live.failure
      ? `The engine could not run this design: ${live.failure}`
      : null;
  const figures = live.result ? { checks: live.result.checks, metrics: live.result.metrics } : null;

  const go = async (path: string) => {
    await d.flush();
    router.push(path as never);
  };

  const status = DESIGN_STATUS[design.status];
  const review = REVIEW_STATE[design.reviewState];

  const header = (
    <View
      style={{
        paddingHorizontal: layout.isNarrow ? theme.space.l : theme.space.xl,
        paddingTop: theme.space.m,
        paddingBottom: theme.space.s,
        gap: theme.space.s,
      }}
    >
      <View style={{ flexDirection: layout.isNarrow ? 'column' : 'row', justifyContent: 'space-between', gap: theme.space.s }}>
        <View style={{ flexShrink: 1, gap: 2 }}>
          <Text variant={layout.isNarrow ? 'title' : 'display'} accessibilityRole="header" testID="design-title">
            {design.name}
          </Text>
          <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s, alignItems: 'center' }}>
            <Text variant="caption" muted>
              {design.projectName}
            </Text>
            <Chip label={`latest revision: ${status.label}`} tone={status.tone} icon={status.icon} />
            {review ? <Chip label={review.label} tone={review.tone} icon={review.icon} /> : null}
            <Text
              variant="caption"
              muted
              testID="save-state"
              color={d.save.kind === 'failed' ? theme.color.status.fail : undefined}
            >
              {mayEdit ? saveText(d.save) : 'Read only: your role cannot change designs'}
            </Text>
          </View>
        </View>
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s, alignItems: 'flex-start' }}>
          {isMainsDraft(d.draft) ? (
            <Button
              label={layout.isNarrow ? 'Mains' : 'Mains power-up'}
              accessibilityLabel="Mains power-up: switch-on angle sweep and cold/hot comparison"
              icon="bolt"
              compact
              onPress={() => go(`/designs/${design.id}/mains`)}
              testID="open-mains"
            />
          ) : null}
          <Button
            label={layout.isNarrow ? 'Precharge' : 'Precharge sizing'}
            accessibilityLabel="Precharge sizing"
            icon="sizing"
            compact
            onPress={() => go(`/designs/${design.id}/precharge`)}
            testID="open-precharge"
          />
          <Button
            label={layout.isNarrow ? 'Revisions' : 'Revisions and review'}
            accessibilityLabel="Revisions and review"
            icon="history"
            compact
            onPress={() => go(`/designs/${design.id}/revisions`)}
            testID="open-revisions"
          />
          <Button
            label={layout.isNarrow ? 'Captures' : 'Bench captures'}
            accessibilityLabel="Bench captures"
            icon="bolt"
            compact
            onPress={() => go(`/designs/${design.id}/captures`)}
            testID="open-captures"
          />
          {mayEdit ? (
            <Button label="Save revision" variant="primary" compact onPress={() => setSaving(true)} testID="save-revision" />
          ) : null}
        </View>
      </View>
      <View
        style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s, alignItems: 'center' }}
        accessibilityLabel="Analyses"
        testID="analyses-links"
      >
        <Text variant="caption" weight="semibold" muted>
          Analyses
        </Text>
        <Button label="Spread" variant="quiet" onPress={() => go(`/designs/${design.id}/spread`)} testID="open-spread" />
        <Button label="Stability" variant="quiet" onPress={() => go(`/designs/${design.id}/stability`)} testID="open-stability" />
        <Button label="Snubber" variant="quiet" onPress={() => go(`/designs/${design.id}/snubber`)} testID="open-snubber" />
      </View>
      {saving ? (
        <SaveRevisionCard
          designId={design.id}
          draft={d.draft}
          flush={d.flush}
          blocked={live.issues.length > 0}
          onClose={() => setSaving(false)}
        />
      ) : null}
    </View>
  );

  const inputs = (
    <View style={{ gap: theme.space.m }}>
      <Card title="Circuit" subtitle="Drawn from the inputs below.">
        <CircuitSketch parts={parts} />
      </Card>
      <EditorForm
        draft={d.draft}
        issues={live.issues}
        readOnly={!mayEdit}
        onField={d.setField}
        onSection={d.setSection}
        onBypass={d.setBypass}
        onBypassMode={d.setBypassMode}
        onLoadKind={d.setLoadKind}
        onValue={d.setValue}
      />
      {mayEdit ? <PartPicker designId={design.id} teamId={design.teamId} flush={d.flush} setValue={d.setValue} /> : null}
    </View>
  );

  const results = live.result ? (
    <ResultsPanel results={live.result} stale={!!staleText} />
  ) : live.pending ? (
    <Loading label="Running the check" />
  ) : (
    <Card title="No result yet">
      <Text muted>{staleText ?? 'Fix the inputs marked in red to see the transient.'}</Text>
    </Card>
  );

  if (layout.isWide) {
    return (
      <View style={{ flex: 1 }} testID="design-screen">
        {header}
        <SummaryStrip figures={figures} stale={staleText} />
        <View style={{ flex: 1, flexDirection: 'row', minHeight: 0 }}>
          <ScrollView
            style={{ flex: 5 }}
            contentContainerStyle={{ padding: theme.space.xl, paddingRight: theme.space.m }}
            testID="editor-column"
            keyboardShouldPersistTaps="handled"
          >
            {inputs}
          </ScrollView>
          <ScrollView
            style={{ flex: 6, borderLeftWidth: 1, borderLeftColor: theme.color.hairline }}
            contentContainerStyle={{ padding: theme.space.xl, paddingLeft: theme.space.m }}
            testID="results-column"
          >
            {results}
          </ScrollView>
        </View>
      </View>
    );
  }

  return (
    <View style={{ flex: 1 }} testID="design-screen">
      <ScrollView style={{ flex: 1 }} stickyHeaderIndices={[1]} keyboardShouldPersistTaps="handled" testID="design-scroll">
        {header}
        <View style={{ backgroundColor: theme.color.paper }}>
          <SummaryStrip figures={figures} stale={staleText} />
          <View style={{ paddingHorizontal: theme.space.l, paddingVertical: theme.space.s }}>
            <Segmented
              accessibilityLabel="Show"
              testID="design-pane"
              value={pane}
              onChange={setPane}
              options={[
                { value: 'results', label: 'Results' },
                { value: 'inputs', label: 'Inputs' },
              ]}
            />
          </View>
        </View>
        <View style={{ padding: theme.space.l, paddingTop: theme.space.s }}>{pane === 'results' ? results : inputs}</View>
      </ScrollView>
    </View>
  );
}

function SaveRevisionCard({
  designId,
  draft,
  flush,
  blocked,
  onClose,
}: {
  designId: string;
  draft: Draft;
  flush: () => Promise<void>;
  blocked: boolean;
  onClose: () => void;
}) {
  const theme = useTheme();
  const router = useRouter();
  const [note, setNote] = useState('');
  const save = useSaveRevision(designId);
  const [saved, setSaved] = useState<RevisionDetail | null>(null);

  const submit = async () => {
    await flush();
    save.mutate({ note: note.trim(), design: draft }, { onSuccess: setSaved });
  };

  if (saved) {
    return (
      <Card
        title={`Revision ${saved.sequence} saved`}
        testID="revision-saved"
        right={<Button label="Close" variant="quiet" compact onPress={onClose} />}
      >
        <Text>
          SHA-256{' '}
          <Text mono testID="revision-hash">
            {shortHash(saved.sha256)}
          </Text>
          . Its check is stored with it and will not change.
        </Text>
        <Button
          label="Request a review"
          variant="primary"
          onPress={() => router.push(`/designs/${designId}/revisions?request=${saved.id}` as never)}
          testID="go-request-review"
          style={{ alignSelf: 'flex-start' }}
        />
      </Card>
    );
  }
  return (
    <Card
      title="Save a revision"
      subtitle="A revision is an immutable copy of the design with its check, named by its hash."
      testID="save-revision-card"
      right={<Button label="Cancel" variant="quiet" compact onPress={onClose} />}
    >
      <TextField
        label="What changed"
        placeholder="Raised Rpre to 68 Ω to bring the pulse energy inside its rating"
        value={note}
        onChangeText={setNote}
        multiline
        testID="revision-note"
      />
      {blocked ? (
        <Text color={theme.color.status.fail} accessibilityRole="alert">
          Fix the inputs marked in red first: a revision must be a design the engine can run.
        </Text>
      ) : null}
      {save.isError ? (
        <Text color={theme.color.status.fail} accessibilityRole="alert">
          {describeError(save.error)}
        </Text>
      ) : null}
      <Button
        label="Save revision"
        variant="primary"
        onPress={submit}
        busy={save.isPending}
        disabled={blocked}
        testID="confirm-save-revision"
        style={{ alignSelf: 'flex-start' }}
      />
    </Card>
  );
}
