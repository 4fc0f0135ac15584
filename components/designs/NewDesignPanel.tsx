import { useRouter } from 'expo-router';
import { useState } from 'react';
import { Pressable, View } from 'react-native';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { isHovered } from '@/components/ui/webProps';
import { describeError } from '@/lib/api/client';
import { createDesignRequestSchema, createProjectRequestSchema } from '@/lib/contracts';
import { useCreateDesign, usePresets } from '@/lib/queries/designs';
import { useCreateProject, useProjects } from '@/lib/queries/projects';
import { useLayout, useTheme } from '@/lib/theme';

const NEW_PROJECT = '__new__';

/** Create a design from one of the engine's presets, in an existing project or a new one. */
export function NewDesignPanel({ onClose }: { onClose: () => void }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const presets = usePresets();
  const projects = useProjects();
  const createProject = useCreateProject();
  const createDesign = useCreateDesign();
  const [presetId, setPresetId] = useState<string | null>(null);
  const [name, setName] = useState('');
  const [chosenProject, setProjectId] = useState<string | null>(null);
  // Until the engineer picks one, the first project (or a new one when there is none).
  const projectId = chosenProject ?? (projects.data ? (projects.data[0]?.id ?? NEW_PROJECT) : null);
  const [projectName, setProjectName] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});

  const choosePreset = (id: string) => {
    const preset = presets.data?.find((p) => p.id === id);
    setPresetId(id);
    if (preset && (!name || presets.data?.some((p) => p.title === name))) setName(preset.title);
  };

  const busy = createProject.isPending || createDesign.isPending;

  const submit = async () => {
    const next: Record<string, string> = {};
    if (!presetId) next.preset = 'Choose a starting point.';
    let newProject: { name: string; description?: string } | null = null;
    if (projectId === NEW_PROJECT || !projectId) {
      const p = createProjectRequestSchema.safeParse({ name: projectName });
      if (!p.success) next.project = p.error.issues[0]?.message ?? 'Name the project.';
      else newProject = p.data;
    }
    const nameCheck = createDesignRequestSchema.shape.name.safeParse(name);
    if (!nameCheck.success) next.name = nameCheck.error.issues[0]?.message ?? 'Enter a name.';
    setErrors(next);
    if (Object.keys(next).length > 0) return;
    try {
      const pid = newProject ? (await createProject.mutateAsync(newProject)).id : projectId!;
      const body = createDesignRequestSchema.parse({ projectId: pid, name: name.trim(), presetId: presetId ?? undefined });
      const design = await createDesign.mutateAsync(body);
      onClose();
      router.push(`/designs/${design.id}`);
    } catch {
      // Shown below from the mutation's error.
    }
  };

  const failure = createProject.error ?? createDesign.error;

  return (
    <Card
      title="New design"
      subtitle="Start from a preset; every value can be changed afterwards."
      testID="new-design-panel"
      right={<Button label="Cancel" variant="quiet" compact onPress={onClose} />}
    >
      {presets.isPending ? (
        <Loading label="Loading presets" />
      ) : presets.isError ? (
        <ErrorNotice error={presets.error} onRetry={() => presets.refetch()} />
      ) : (
        <View style={{ gap: theme.space.s }}>
          <Text variant="caption" weight="semibold" muted>
            Starting point
          </Text>
          <View
            style={{ flexDirection: layout.isNarrow ? 'column' : 'row', flexWrap: 'wrap', gap: theme.space.s }}
            role="radiogroup"
            accessibilityLabel="Starting point"
          >
            {presets.data.map((p) => {
              const selected = p.id === presetId;
              return (
                <Pressable
                  key={p.id}
                  testID={`preset-${p.id}`}
                  accessibilityRole="radio"
                  accessibilityState={{ checked: selected }}
                  accessibilityLabel={`${p.title}. ${p.summary}`}
                  onPress={() => choosePreset(p.id)}
                  style={(state) => ({
                    flexBasis: layout.isNarrow ? undefined : '48%',
                    flexGrow: 1,
                    minHeight: 44,
                    padding: theme.space.m,
                    gap: 4,
                    borderRadius: theme.radius,
                    borderWidth: selected ? 2 : 1,
                    borderColor: selected ? theme.color.accent : theme.color.hairline,
                    backgroundColor: selected || isHovered(state) ? theme.color.accentSoft : theme.color.card,
                  })}
                >
                  <Text weight="semibold">{p.title}</Text>
                  <Text variant="caption" muted>
                    {p.summary}
                  </Text>
                </Pressable>
              );
            })}
          </View>
          {errors.preset ? (
            <Text variant="caption" color={theme.color.status.fail}>
              {errors.preset}
            </Text>
          ) : null}
        </View>
      )}

      <TextField label="Design name" value={name} onChangeText={setName} error={errors.name} testID="new-design-name" />

      <View style={{ gap: theme.space.s }}>
        <Text variant="caption" weight="semibold" muted>
          Project
        </Text>
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s }}>
          {(projects.data ?? []).map((p) => (
            <Chip key={p.id} label={p.name} selected={projectId === p.id} onPress={() => setProjectId(p.id)} />
          ))}
          <Chip
            label="New project"
            icon="plus"
            selected={projectId === NEW_PROJECT}
            onPress={() => setProjectId(NEW_PROJECT)}
            testID="project-new"
          />
        </View>
        {projectId === NEW_PROJECT ? (
          <TextField
            label="Project name"
            placeholder="Depot charger"
            value={projectName}
            onChangeText={setProjectName}
            error={errors.project}
            testID="new-project-name"
          />
        ) : null}
      </View>

      {failure ? (
        <Text color={theme.color.status.fail} accessibilityRole="alert">
          {describeError(failure)}
        </Text>
      ) : null}
      <Button
        label="Create design"
        variant="primary"
        onPress={submit}
        busy={busy}
        testID="create-design"
        style={{ alignSelf: layout.isNarrow ? 'stretch' : 'flex-start' }}
      />
    </Card>
  );
}
