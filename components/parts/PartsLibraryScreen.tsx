// The team's parts library: search and filter by kind, create, edit, archive, and the CSV sheet
// (template, export, import with per-row errors and an "import only the valid rows" choice).
import { useMemo, useState } from 'react';
import { Platform, ScrollView, View } from 'react-native';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { Screen } from '@/components/ui/Screen';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { describeError, isApiError } from '@/lib/api/client';
import { can, useMe } from '@/lib/queries/auth';
import {
  useArchivePart,
  useDownloadPartsFile,
  useImportParts,
  useParts,
  useSavePart,
  type PartRow,
  type PartsImportResult,
} from '@/lib/queries/bench';
import { useLayout, useTheme } from '@/lib/theme';
import { KIND_FIELDS, PART_FIELDS, PART_KINDS, type PartField, type PartKind } from '@/sim/parts';
import { formatEng } from '@/sim/units';

type PickedFile = Blob & { name: string };

/** Kind names for headings and table cells (the engine's KIND_LABELS are for sentences: "a fuse"). */
const KIND_LABELS: Record<PartKind, string> = {
  capacitor: 'Capacitor',
  resistor: 'Resistor',
  inductor: 'Inductor',
  contactor: 'Contactor or relay',
  fuse: 'Fuse',
  semiconductor: 'Semiconductor',
};

function pickFile(accept: string): Promise<PickedFile | null> {
  return new Promise((resolve) => {
    if (typeof document === 'undefined') return resolve(null);
    const input = document.createElement('input');
    input.type = 'file';
    input.accept = accept;
    input.style.display = 'none';
    input.onchange = () => {
      const file = input.files?.[0] ?? null;
      input.remove();
      resolve(file as PickedFile | null);
    };
    document.body.appendChild(input);
    input.click();
  });
}

const fieldsOf = (kind: PartKind): PartField[] => [...KIND_FIELDS[kind].required, ...KIND_FIELDS[kind].optional] as PartField[];

function show(part: PartRow, field: PartField): string {
  const value = part[field];
  if (typeof value !== 'number') return '';
  const unit = PART_FIELDS[field].unit;
  return field === 'tolerance' ? `${Number((value * 100).toPrecision(4))} %` : formatEng(value, unit, 4);
}

const COLUMNS: { key: string; label: string; width: number }[] = [
  { key: 'partNumber', label: 'Part number', width: 150 },
  { key: 'kind', label: 'Kind', width: 140 },
  { key: 'ratings', label: 'Ratings', width: 300 },
  { key: 'description', label: 'Description', width: 220 },
  { key: 'actions', label: '', width: 190 },
];

export function PartsLibraryScreen() {
  const theme = useTheme();
  const layout = useLayout();
  const me = useMe();
  const teamId = me.data?.currentTeam?.id ?? me.data?.teams[0]?.id ?? null;
  const role = me.data?.currentTeam?.role ?? me.data?.teams.find((t) => t.id === teamId)?.role;
  const mayEdit = can(role, 'edit');
  const [search, setSearch] = useState('');
  const [kind, setKind] = useState<PartKind | ''>('');
  const [archived, setArchived] = useState(false);
  const parts = useParts(teamId, search.trim(), kind, archived);
  const archive = useArchivePart();
  const download = useDownloadPartsFile();
  const [editing, setEditing] = useState<PartRow | 'new' | null>(null);
  const actions = (
    <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
      {mayEdit ? <Button label="New part" icon="plus" onPress={() => setEditing('new')} testID="part-new" /> : null}
      <Button label="Export CSV" icon="download" variant="secondary" onPress={() => download.mutate('export.csv')} testID="parts-export" />
      <Button label="CSV template" icon="download" variant="quiet" onPress={() => download.mutate('template.csv')} testID="parts-template" />
    </View>
  );

  return (
    <Screen
      title="Parts"
      subtitle="The team's component ratings. A design takes a part's values; its revisions keep them."
      testID="parts-screen"
      actions={layout.isNarrow ? undefined : actions}
    >
      <View style={{ gap: 16 }}>
        {layout.isNarrow ? actions : null}
        {editing ? <PartForm key={editing === 'new' ? 'new' : editing.id} part={editing === 'new' ? null : editing} onDone={() => setEditing(null)} /> : null}
        {mayEdit && Platform.OS === 'web' ? <ImportCard /> : null}
        <Card>
          <View style={{ gap: 12 }}>
            <TextField label="Search" value={search} onChangeText={setSearch} placeholder="Part number, description or maker" testID="parts-search" />
            <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={{ gap: 8 }}>
              <Chip label="All kinds" selected={kind === ''} onPress={() => setKind('')} />
              {PART_KINDS.map((k) => (
                <Chip key={k} label={KIND_LABELS[k]} selected={kind === k} onPress={() => setKind(k)} testID={`parts-kind-${k}`} />
              ))}
              <Chip label="Archived" selected={archived} onPress={() => setArchived(!archived)} icon="history" />
            </ScrollView>
            {download.isError ? <Text color={theme.color.danger}>{describeError(download.error)}</Text> : null}
            {archive.isError ? <Text color={theme.color.danger}>{describeError(archive.error)}</Text> : null}
            {parts.isPending ? (
              <Loading label="Loading parts" />
            ) : parts.isError ? (
              <ErrorNotice error={parts.error} onRetry={() => parts.refetch()} />
            ) : parts.data.items.length === 0 ? (
              <Text muted>{search || kind ? 'No part matches.' : archived ? 'No archived parts.' : 'No parts yet.'}</Text>
            ) : layout.isNarrow ? (
              <View style={{ gap: 8 }} testID="parts-table">
                {parts.data.items.map((p) => (
                  <View key={p.id} style={{ borderWidth: 1, borderColor: theme.color.hairline, borderRadius: theme.radius, padding: 12, gap: 4 }}>
                    <Text weight="semibold" mono>
                      {p.partNumber}
                    </Text>
                    <Text variant="caption" muted>
                      {KIND_LABELS[p.kind as PartKind]}
                      {p.description ? ` · ${p.description}` : ''}
                    </Text>
                    <Text variant="caption">{fieldsOf(p.kind as PartKind).map((f) => (show(p, f) ? `${PART_FIELDS[f].label} ${show(p, f)}` : '')).filter(Boolean).join(' · ')}</Text>
                    {mayEdit ? (
                      <View style={{ flexDirection: 'row', gap: 8, marginTop: 4 }}>
                        <Button label="Edit" variant="secondary" onPress={() => setEditing(p)} accessibilityLabel={`Edit ${p.partNumber}`} />
                        <Button label={p.archived ? 'Unarchive' : 'Archive'} variant="quiet" onPress={() => archive.mutate({ id: p.id, archived: !p.archived })} accessibilityLabel={`${p.archived ? 'Unarchive' : 'Archive'} ${p.partNumber}`} />
                      </View>
                    ) : null}
                  </View>
                ))}
              </View>
            ) : (
              <ScrollView horizontal testID="parts-table">
                <View>
                  <View style={{ flexDirection: 'row', borderBottomWidth: 1, borderColor: theme.color.hairline }}>
                    {COLUMNS.map((c) => (
                      <Text key={c.key} weight="semibold" variant="caption" style={{ width: c.width, padding: 8 }}>
                        {c.label}
                      </Text>
                    ))}
                  </View>
                  {parts.data.items.map((p) => (
                    <View key={p.id} style={{ flexDirection: 'row', alignItems: 'center', borderBottomWidth: 1, borderColor: theme.color.hairline }}>
                      <Text mono style={{ width: 150, padding: 8 }}>
                        {p.partNumber}
                      </Text>
                      <Text style={{ width: 140, padding: 8 }}>{KIND_LABELS[p.kind as PartKind]}</Text>
                      <Text variant="caption" style={{ width: 300, padding: 8 }}>
                        {fieldsOf(p.kind as PartKind).map((f) => (show(p, f) ? `${PART_FIELDS[f].label} ${show(p, f)}` : '')).filter(Boolean).join(' · ')}
                      </Text>
                      <Text variant="caption" muted style={{ width: 220, padding: 8 }}>
                        {p.description ?? ''}
                      </Text>
                      <View style={{ width: 190, padding: 4, flexDirection: 'row', gap: 4 }}>
                        {mayEdit ? (
                          <>
                            <Button label="Edit" variant="secondary" compact onPress={() => setEditing(p)} accessibilityLabel={`Edit ${p.partNumber}`} />
                            <Button label={p.archived ? 'Unarchive' : 'Archive'} variant="quiet" compact onPress={() => archive.mutate({ id: p.id, archived: !p.archived })} accessibilityLabel={`${p.archived ? 'Unarchive' : 'Archive'} ${p.partNumber}`} />
                          </>
                        ) : null}
                      </View>
                    </View>
                  ))}
                </View>
              </ScrollView>
            )}
          </View>
        </Card>
      </View>
    </Screen>
  );
}

function PartForm({ part, onDone }: { part: PartRow | null; onDone: () => void }) {
  const theme = useTheme();
  const save = useSavePart();
  const [kind, setKind] = useState<PartKind>((part?.kind as PartKind) ?? 'capacitor');
  const [values, setValues] = useState<Record<string, string>>(() => {
    const out: Record<string, string> = {};
    if (part) {
      for (const key of ['partNumber', 'description', 'maker', 'notes']) out[key] = String(part[key] ?? '');
      for (const f of fieldsOf(part.kind as PartKind)) out[f] = show(part, f);
    }
    return out;
  });
  const set = (key: string) => (text: string) => setValues((v) => ({ ...v, [key]: text }));
  const error = (key: string) => (isApiError(save.error) ? save.error.fieldMessage(key) : undefined);
  const required = useMemo(() => new Set<string>(KIND_FIELDS[kind].required), [kind]);

  const submit = () => {
    const body: Record<string, unknown> = { kind };
    for (const key of ['partNumber', 'description', 'maker', 'notes']) {
      const text = (values[key] ?? '').trim();
      if (text) body[key] = text;
      else if (part) body[key] = null;
    }
    for (const f of fieldsOf(kind)) {
      const text = (values[f] ?? '').trim();
      if (text) body[f] = text;
      else if (part) body[f] = null;
    }
    save.mutate({ id: part?.id, body }, { onSuccess: onDone });
  };

  return (
    <Card title={part ? `Edit ${part.partNumber}` : 'New part'} subtitle="Values with units (940 µF, 3 mΩ, 10 %) or SI numbers." testID="part-form">
      <View style={{ gap: 12 }}>
        {part ? null : (
          <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={{ gap: 8 }}>
            {PART_KINDS.map((k) => (
              <Chip key={k} label={KIND_LABELS[k]} selected={kind === k} onPress={() => setKind(k)} testID={`part-form-kind-${k}`} />
            ))}
          </ScrollView>
        )}
        <TextField label="Part number" value={values.partNumber ?? ''} onChangeText={set('partNumber')} error={error('partNumber')} testID="part-form-partNumber" />
        {fieldsOf(kind).map((f) => (
          <TextField
            key={f}
            label={`${PART_FIELDS[f].label}${required.has(f) ? '' : ' (optional)'}`}
            value={values[f] ?? ''}
            onChangeText={set(f)}
            error={error(f)}
            mono
            testID={`part-form-${f}`}
          />
        ))}
        <TextField label="Description (optional)" value={values.description ?? ''} onChangeText={set('description')} error={error('description')} />
        <TextField label="Maker (optional)" value={values.maker ?? ''} onChangeText={set('maker')} error={error('maker')} />
        <TextField label="Notes (optional)" value={values.notes ?? ''} onChangeText={set('notes')} error={error('notes')} multiline />
        {save.isError ? <Text color={theme.color.danger}>{describeError(save.error)}</Text> : null}
        <View style={{ flexDirection: 'row', gap: 8 }}>
          <Button label={part ? 'Save the part' : 'Add the part'} icon="pass" onPress={submit} busy={save.isPending} testID="part-form-save" />
          <Button label="Cancel" variant="quiet" onPress={onDone} />
        </View>
      </View>
    </Card>
  );
}

function ImportCard() {
  const theme = useTheme();
  const importer = useImportParts();
  const [file, setFile] = useState<PickedFile | null>(null);
  const [result, setResult] = useState<PartsImportResult | null>(null);
  const run = (picked: PickedFile, validOnly: boolean) =>
    importer.mutate({ file: picked, validOnly }, { onSuccess: (r) => setResult(r) });

  return (
    <Card title="Import parts from CSV" subtitle="All rows or none; a row with a problem stops the import unless you choose the valid rows only." testID="parts-import">
      <View style={{ gap: 12 }}>
        <Button
          label="Choose a CSV file"
          icon="plus"
          variant="secondary"
          testID="parts-import-choose"
          busy={importer.isPending}
          onPress={async () => {
            const picked = await pickFile('.csv,.tsv,.txt,text/csv,text/plain');
            if (!picked) return;
            setFile(picked);
            setResult(null);
            run(picked, false);
          }}
        />
        {importer.isError ? <Text color={theme.color.danger}>{describeError(importer.error)}</Text> : null}
        {result ? (
          result.errors.length === 0 || result.imported > 0 ? (
            <Text color={theme.color.status.pass} testID="parts-import-done">
              Imported {result.imported} of {result.rows} rows.{result.errors.length ? ` ${result.errors.length} rows with problems were left out.` : ''}
            </Text>
          ) : (
            <View style={{ gap: 8 }} testID="parts-import-errors">
              <Text color={theme.color.danger}>
                Nothing was imported: {result.errors.length} {result.errors.length === 1 ? 'problem' : 'problems'} in {file?.name}. {result.validRows} of {result.rows} rows are valid.
              </Text>
              {result.errors.map((e, k) => (
                <Text key={k} mono variant="caption">
                  Row {e.row}
                  {e.column ? `, ${e.column}` : ''}: {e.message}
                </Text>
              ))}
              {file && result.validRows > 0 ? (
                <Button label={`Import only the ${result.validRows} valid rows`} onPress={() => run(file, true)} testID="parts-import-valid-only" busy={importer.isPending} />
              ) : null}
            </View>
          )
        ) : null}
      </View>
    </Card>
  );
}
