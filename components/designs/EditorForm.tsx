import { memo } from 'react';
import { View } from 'react-native';
import { Card } from '@/components/ui/Card';
import { Icon } from '@/components/ui/Icon';
import { Segmented } from '@/components/ui/Segmented';
import { Text } from '@/components/ui/Text';
import { Toggle } from '@/components/ui/Toggle';
import { UnitField } from '@/components/ui/UnitField';
import { useTheme } from '@/lib/theme';
import type { DesignIssue } from '@/sim/errors';
import { dimensionOf, fieldText, getIn, GROUPS, type Draft, type GroupSpec, type SectionKey } from './designForm';
import { isMainsDraft, MAINS_PATHS, MainsSection, NOT_IN_MAINS } from './MainsSection';

export interface EditorFormProps {
  draft: Draft;
  issues: DesignIssue[];
  readOnly?: boolean;
  onField: (path: string, text: string) => void;
  onSection: (section: SectionKey, fitted: boolean) => void;
  onBypass: (fitted: boolean) => void;
  onBypassMode: (mode: 'voltage' | 'time') => void;
  onLoadKind: (kind: 'none' | 'resistance' | 'current' | 'power') => void;
  /** Sets a raw value (the mains group's switches); needed for mains designs. */
  onValue?: (path: string, value: unknown) => void;
}

const LOAD_LABEL = { resistance: 'Load resistance', current: 'Load current', power: 'Load power' } as const;

/** Every input of a design, grouped as an engineer reads a schematic: source to load, then ratings. */
export const EditorForm = memo(function EditorForm(props: EditorFormProps) {
  const theme = useTheme();
  const { draft, issues } = props;
  const mains = isMainsDraft(draft);
  const groups = mains ? GROUPS.filter((g) => !NOT_IN_MAINS.has(g.key)) : GROUPS;
  const shownPaths = new Set<string>(mains ? MAINS_PATHS : []);
  for (const g of groups) for (const f of g.fields) if (!f.when || f.when(draft)) shownPaths.add(f.path);
  // Issues that no visible field can show (a cross-check on the design as a whole).
  const loose = issues.filter((i) => !shownPaths.has(i.path));

  return (
    <View style={{ gap: theme.space.m }} testID="design-editor">
      {loose.length ? (
        <View
          accessibilityRole="alert"
          style={{
            gap: 4,
            padding: theme.space.m,
            borderRadius: theme.radius,
            backgroundColor: theme.color.statusSoft.fail,
            borderWidth: 1,
            borderColor: theme.color.status.fail,
          }}
        >
          {loose.map((i) => (
            <View key={`${i.path}:${i.message}`} style={{ flexDirection: 'row', gap: 6, alignItems: 'flex-start' }}>
              <Icon name="fail" size={14} color={theme.color.status.fail} />
              <Text variant="caption" style={{ flex: 1 }}>
                {i.path ? `${i.path}: ` : ''}
                {i.message}
              </Text>
            </View>
          ))}
        </View>
      ) : null}
      {mains && props.onValue ? (
        <MainsSection draft={draft} issues={issues} readOnly={props.readOnly} onField={props.onField} onValue={props.onValue} />
      ) : null}
      {groups.map((g) => (
        <Group key={g.key} group={g} {...props} />
      ))}
    </View>
  );
});

function Group({
  group,
  draft,
  issues,
  readOnly,
  onField,
  onSection,
  onBypass,
  onBypassMode,
  onLoadKind,
}: EditorFormProps & { group: GroupSpec }) {
  const theme = useTheme();
  const fitted = group.key === 'run' || group.key === 'ratings' ? true : getIn(draft, group.key) != null;
  const loadKind = (getIn(draft, 'load.kind') as string | undefined) ?? 'none';
  const bypass = getIn(draft, 'precharge.bypass') != null;
  const bypassMode = (getIn(draft, 'precharge.bypass.when') as string | undefined) === 'time' ? 'time' : 'voltage';
  const fields = group.fields.filter((f) => !f.when || f.when(draft));

  return (
    <Card title={group.title} subtitle={group.blurb} testID={`group-${group.key}`}>
      {group.key === 'load' ? (
        <Segmented
          accessibilityLabel="Kind of load"
          testID="load-kind"
          value={fitted ? (loadKind as 'none') : 'none'}
          onChange={(v) => !readOnly && onLoadKind(v)}
          options={[
            { value: 'none', label: 'None' },
            { value: 'resistance', label: 'Resistance' },
            { value: 'current', label: 'Constant current' },
            { value: 'power', label: 'Constant power' },
          ]}
        />
      ) : group.removable ? (
        <Toggle
          label={fitted ? `${group.title}: fitted` : `${group.title}: not fitted`}
          value={fitted}
          onChange={(v) => onSection(group.key, v)}
          testID={`fit-${group.key}`}
          disabled={readOnly}
        />
      ) : null}

      {group.key === 'precharge' && fitted ? (
        <View style={{ gap: theme.space.s }}>
          <Toggle
            label={bypass ? 'Bypass contactor: fitted' : 'Bypass contactor: not fitted'}
            value={bypass}
            onChange={onBypass}
            testID="fit-bypass"
            disabled={readOnly}
          />
          {bypass ? (
            <Segmented
              accessibilityLabel="When the bypass closes"
              value={bypassMode}
              onChange={(v) => !readOnly && onBypassMode(v)}
              options={[
                { value: 'voltage', label: 'At a capacitor voltage' },
                { value: 'time', label: 'At a time' },
              ]}
            />
          ) : null}
        </View>
      ) : null}

      {fitted && fields.length ? (
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.m }}>
          {fields.map((f) => {
            const dimension = dimensionOf(f, draft);
            const error = issues.find((i) => i.path === f.path)?.message;
            const label = f.path === 'load.value' ? (LOAD_LABEL[loadKind as keyof typeof LOAD_LABEL] ?? f.label) : f.label;
            return (
              <View key={f.path} style={{ flexBasis: 200, flexGrow: 1, minWidth: 0 }}>
                <UnitField
                  label={label}
                  dimension={dimension}
                  value={fieldText(getIn(draft, f.path), dimension)}
                  onChangeText={(t) => onField(f.path, t)}
                  readOnly={readOnly}
                  error={error}
                  optional={f.optional}
                  emptyMeaning={f.emptyMeaning}
                  testID={`field-${f.path}`}
                />
              </View>
            );
          })}
        </View>
      ) : null}
    </Card>
  );
}
