// Bench captures of a design: upload a scope export (web), map its columns, see it over the
// simulated waveform with a time shift, fit the design's source L and R to it and apply the fit.
import { useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { Platform, ScrollView, View } from 'react-native';
import { CaptureOverlayChart, simulatedOf, type OverlaySeries } from '@/components/captures/CaptureOverlayChart';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { Screen } from '@/components/ui/Screen';
import { Segmented } from '@/components/ui/Segmented';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { readQuantity } from '@/components/ui/UnitField';
import { describeError } from '@/lib/api/client';
import type { DesignDetail } from '@/lib/contracts';
import { useMe } from '@/lib/queries/auth';
import {
  UploadError,
  useCapture,
  useCapturePreview,
  useCaptures,
  useDeleteCapture,
  useFitCapture,
  useSimulatedWaveform,
  useUploadCapture,
  type CaptureMappingInput,
  type CapturePreview,
  type FitResult,
  type Quantity,
} from '@/lib/queries/bench';
import { useDesign, useUpdateDesign } from '@/lib/queries/designs';
import { useLayout, useTheme } from '@/lib/theme';
import { formatEng } from '@/sim/units';

const QUANTITY_LABEL: Record<Quantity, string> = {
  capacitorVoltage: 'Capacitor voltage',
  busVoltage: 'Bus voltage',
  current: 'Current',
};
const PARAM_LABEL: Record<string, [string, string]> = {
  'source.inductance': ['Source inductance', 'H'],
  'source.resistance': ['Source resistance', 'Ω'],
  'source.voltage': ['Source voltage', 'V'],
  'filter.inductance': ['Filter inductance', 'H'],
  'filter.resistance': ['Filter resistance', 'Ω'],
  'capacitor.capacitance': ['Capacitance', 'F'],
  'capacitor.esr': ['ESR', 'Ω'],
};

type PickedFile = Blob & { name: string };

/** Opens the browser's file dialog (web only). */
function pickFile(accept: string): Promise<PickedFile | null> {
  return new Promise((resolve) => {
    if (typeof document === 'undefined') return resolve(null);
    const input = document.createElement('input');
    input.type = 'file';
    input.accept = accept;
    input.style.display = 'none';
    input.setAttribute('data-testid', 'capture-file-input');
    input.onchange = () => {
      const file = input.files?.[0] ?? null;
      input.remove();
      resolve(file as PickedFile | null);
    };
    document.body.appendChild(input);
    input.click();
  });
}

export function CapturesScreen({ id }: { id: string }) {
  const design = useDesign(id);
  if (design.isPending) return <Loading label="Opening the design" />;
  if (design.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={design.error} onRetry={() => design.refetch()} />
      </View>
    );
  return <Captures design={design.data} />;
}

function uploadMessage(error: unknown): string {
  if (error instanceof UploadError && error.line) {
    return `${error.message}${error.message.includes(`line ${error.line}`) ? '' : ` (line ${error.line}${error.column ? `, column ${error.column}` : ''})`}`;
  }
  return describeError(error);
}

function Captures({ design }: { design: DesignDetail }) {
  const router = useRouter();
  const layout = useLayout();
  const me = useMe();
  const role = me.data?.teams.find((t) => t.id === design.teamId)?.role;
  const mayUpload = role === 'engineer';
  const captures = useCaptures(design.id);
  const [selected, setSelected] = useState<string | null>(null);
  const current = selected ?? captures.data?.items[0]?.id ?? null;

  return (
    <Screen
      title="Bench captures"
      subtitle={`${design.name}: measured waveforms beside the simulation.`}
      testID="captures-screen"
      actions={<Button label="Back to the design" variant="quiet" icon="chevron-left" onPress={() => router.push(`/designs/${design.id}` as never)} />}
    >
      <View style={{ gap: 16, flexDirection: layout.isNarrow ? 'column' : 'row', alignItems: 'flex-start' }}>
        <View style={{ gap: 16, width: layout.isNarrow ? '100%' : 380 }}>
          {mayUpload ? (
            <UploadCard designId={design.id} onStored={(captureId) => setSelected(captureId)} />
          ) : (
            <Card title="Upload a capture">
              <Text muted>Only engineers of this team upload captures. You can look at the ones stored.</Text>
            </Card>
          )}
          <Card title="Stored captures" testID="capture-list">
            {captures.isPending ? (
              <Loading label="Loading captures" />
            ) : captures.isError ? (
              <ErrorNotice error={captures.error} onRetry={() => captures.refetch()} />
            ) : captures.data.items.length === 0 ? (
              <Text muted>No captures yet for this design.</Text>
            ) : (
              <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: 8 }}>
                {captures.data.items.map((c) => (
                  <Chip
                    key={c.id}
                    label={`${c.name} · ${c.rows} rows`}
                    selected={c.id === current}
                    onPress={() => setSelected(c.id)}
                    accessibilityLabel={`Show capture ${c.name}`}
                  />
                ))}
              </View>
            )}
          </Card>
        </View>
        <View style={{ flex: layout.isNarrow ? undefined : 1, width: layout.isNarrow ? '100%' : undefined, gap: 16 }}>
          {current ? <CaptureView key={current} captureId={current} design={design} mayEdit={mayUpload} onDeleted={() => setSelected(null)} /> : null}
        </View>
      </View>
    </Screen>
  );
}

const TIME_UNITS = ['s', 'ms', 'us', 'ns'] as const;
const UNITS: Record<Quantity, string[]> = { capacitorVoltage: ['V', 'mV', 'kV'], busVoltage: ['V', 'mV', 'kV'], current: ['A', 'mA', 'kA'] };

function guessTimeUnit(name: string): (typeof TIME_UNITS)[number] {
  const m = /\((\w+)\)|\[(\w+)\]/.exec(name);
  const u = (m?.[1] ?? m?.[2] ?? '').toLowerCase();
  if (u === 'ms') return 'ms';
  if (u === 'us' || u === 'µs') return 'us';
  if (u === 'ns') return 'ns';
  return 's';
}

function UploadCard({ designId, onStored }: { designId: string; onStored: (id: string) => void }) {
  const theme = useTheme();
  const preview = useCapturePreview();
  const upload = useUploadCapture(designId);
  const [file, setFile] = useState<PickedFile | null>(null);
  const [timeColumn, setTimeColumn] = useState(0);
  const [timeUnit, setTimeUnit] = useState<(typeof TIME_UNITS)[number]>('s');
  const [column, setColumn] = useState(1);
  const [quantity, setQuantity] = useState<Quantity>('capacitorVoltage');
  const [unit, setUnit] = useState('V');
  const [scale, setScale] = useState('1');

  if (Platform.OS !== 'web')
    return (
      <Card title="Upload a capture">
        <Text muted>Uploading a capture works in the web app (a browser on a computer or phone). Stored captures show here.</Text>
      </Card>
    );

  const choose = async () => {
    const picked = await pickFile('.csv,.tsv,.txt,text/csv,text/plain,text/tab-separated-values');
    if (!picked) return;
    setFile(picked);
    upload.reset();
    preview.mutate(picked, {
      onSuccess: (p: CapturePreview) => {
        setTimeColumn(p.timeColumn);
        setTimeUnit(guessTimeUnit(p.columns[p.timeColumn]?.name ?? ''));
        setColumn(p.columns.find((c) => c.index !== p.timeColumn)?.index ?? 1);
      },
    });
  };

  const scaleValue = Number(scale.trim() === '' ? '1' : scale);
  const scaleError = Number.isFinite(scaleValue) && scaleValue !== 0 ? undefined : 'A number other than 0 (a 10:1 probe recorded at 1:1 is 10).';
  const mapping: CaptureMappingInput = {
    time: { column: timeColumn, unit: timeUnit },
    channels: [{ column, quantity, unit, ...(scaleValue !== 1 ? { scale: scaleValue } : {}) }],
  };
  const p = preview.data;
  const columnError = column === timeColumn ? 'The channel cannot be the time column.' : undefined;

  return (
    <Card title="Upload a capture" subtitle="A scope or logger export: .csv, .tsv or .txt, up to 20 MB." testID="capture-upload">
      <View style={{ gap: 12 }}>
        <Button label={file ? 'Choose another file' : 'Choose a file'} icon="plus" variant="secondary" onPress={choose} testID="capture-choose" busy={preview.isPending} />
        {file ? (
          <Text variant="caption" muted mono>
            {file.name} · {formatEng(file.size, 'B', 3)}
          </Text>
        ) : null}
        {preview.isError ? (
          <Text color={theme.color.danger} testID="capture-error">
            {uploadMessage(preview.error)}
          </Text>
        ) : null}
        {p ? (
          <View style={{ gap: 12 }} testID="capture-mapping">
            <Text variant="caption" muted>
              {p.rows} rows, separator “{p.delimiter === '\t' ? 'tab' : p.delimiter}”, decimal mark “{p.decimal}”
              {p.skippedLines.length ? `, ${p.skippedLines.length} preamble lines skipped` : ''}.
            </Text>
            <ScrollView horizontal style={{ borderWidth: 1, borderColor: theme.color.hairline, borderRadius: theme.radius }} testID="capture-preview-table">
              <View>
                <View style={{ flexDirection: 'row', backgroundColor: theme.color.accentSoft }}>
                  {p.columns.map((c) => (
                    <Text key={c.index} weight="semibold" variant="caption" style={{ width: 110, padding: 6 }}>
                      {c.index}: {c.name}
                    </Text>
                  ))}
                </View>
                {p.preview.slice(0, 6).map((row, r) => (
                  <View key={r} style={{ flexDirection: 'row', borderTopWidth: 1, borderColor: theme.color.hairline }}>
                    {row.map((cell, k) => (
                      <Text key={k} mono variant="caption" style={{ width: 110, padding: 6 }}>
                        {cell}
                      </Text>
                    ))}
                  </View>
                ))}
              </View>
            </ScrollView>
            <Text weight="semibold">Time column</Text>
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: 8 }}>
              {p.columns.map((c) => (
                <Chip key={c.index} label={`${c.index}: ${c.name}`} selected={c.index === timeColumn} onPress={() => setTimeColumn(c.index)} accessibilityLabel={`Time is column ${c.index}`} />
              ))}
            </View>
            <Segmented accessibilityLabel="Time unit" value={timeUnit} onChange={setTimeUnit} options={TIME_UNITS.map((u) => ({ value: u, label: u === 'us' ? 'µs' : u }))} testID="capture-time-unit" />
            <Text weight="semibold">Measured channel</Text>
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: 8 }}>
              {p.columns
                .filter((c) => c.index !== timeColumn)
                .map((c) => (
                  <Chip key={c.index} label={`${c.index}: ${c.name}`} selected={c.index === column} onPress={() => setColumn(c.index)} accessibilityLabel={`Channel is column ${c.index}`} />
                ))}
            </View>
            {columnError ? <Text color={theme.color.danger}>{columnError}</Text> : null}
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: 8 }} testID="capture-quantity" accessibilityLabel="What the channel measured">
              {(Object.keys(QUANTITY_LABEL) as Quantity[]).map((q) => (
                <Chip
                  key={q}
                  label={QUANTITY_LABEL[q]}
                  selected={q === quantity}
                  onPress={() => {
                    setQuantity(q);
                    setUnit(UNITS[q][0]);
                  }}
                  accessibilityLabel={`The channel measured the ${QUANTITY_LABEL[q].toLowerCase()}`}
                />
              ))}
            </View>
            <Segmented accessibilityLabel="Channel unit" value={unit} onChange={setUnit} options={UNITS[quantity].map((u) => ({ value: u, label: u }))} testID="capture-unit" />
            <TextField label="Probe or shunt factor" value={scale} onChangeText={setScale} error={scaleError} keyboardType="decimal-pad" testID="capture-scale" />
            {upload.isError ? (
              <Text color={theme.color.danger} testID="capture-upload-error">
                {uploadMessage(upload.error)}
              </Text>
            ) : null}
            <Button
              label="Store the capture"
              icon="pass"
              disabled={!file || !!scaleError || !!columnError}
              busy={upload.isPending}
              testID="capture-store"
              onPress={() =>
                file &&
                upload.mutate(
                  { file, mapping },
                  {
                    onSuccess: (c) => {
                      preview.reset();
                      setFile(null);
                      onStored(c.id);
                    },
                  },
                )
              }
            />
          </View>
        ) : null}
      </View>
    </Card>
  );
}

function CaptureView({ captureId, design, mayEdit, onDeleted }: { captureId: string; design: DesignDetail; mayEdit: boolean; onDeleted: () => void }) {
  const theme = useTheme();
  const capture = useCapture(captureId);
  const remove = useDeleteCapture(design.id);
  const fit = useFitCapture();
  const update = useUpdateDesign(design.id);
  const [shiftText, setShiftText] = useState('0 s');
  const [applied, setApplied] = useState(false);
  const shift = readQuantity(shiftText, 'time');
  const offset = shift.ok === true ? shift.value : 0;
  const channel = capture.data?.data.channels[0] ?? null;
  const quantity: Quantity = channel?.quantity ?? 'capacitorVoltage';
  const draft = design.draft as Record<string, unknown> | null;
  const simulated = useSimulatedWaveform(`draft-${design.id}`, draft);
  const fitted = fit.data && draft ? { ...draft, ...fit.data.apply } : null;
  const fittedSim = useSimulatedWaveform(`fit-${captureId}`, fitted);

  const series = useMemo(() => {
    const out: OverlaySeries[] = [];
    if (simulated.data) out.push({ label: 'Simulated (draft)', t: simulated.data.t, y: simulatedOf(simulated.data, quantity), color: theme.color.trace[quantity], width: 2.5 });
    if (fittedSim.data) out.push({ label: 'Simulated (fitted)', t: fittedSim.data.t, y: simulatedOf(fittedSim.data, quantity), color: theme.color.accent, dashed: true, width: 2.5 });
    if (capture.data && channel)
      out.push({ label: `Measured: ${channel.name}`, t: capture.data.data.time.map((t) => t + offset), y: channel.values, color: theme.color.trace.measured, width: 1.2 });
    return out;
  }, [simulated.data, fittedSim.data, capture.data, channel, offset, quantity, theme]);

  if (capture.isPending) return <Loading label="Loading the capture" />;
  if (capture.isError) return <ErrorNotice error={capture.error} onRetry={() => capture.refetch()} />;
  const c = capture.data;
  const nudge = (sign: number) => {
    const span = c.data.time.length > 1 ? c.data.time[c.data.time.length - 1] - c.data.time[0] : 1e-3;
    const step = span / 100;
    setShiftText(formatEng(offset + sign * step, 's', 4));
  };

  const applyFit = (result: FitResult) => {
    if (!draft) return;
    update.mutate({ draft: { ...draft, ...result.apply } }, { onSuccess: () => setApplied(true) });
  };

  return (
    <>
      <Card
        title={c.name}
        subtitle={`${QUANTITY_LABEL[quantity]} · ${c.rows} rows · SHA-256 ${c.sha256.slice(0, 12)}…`}
        testID="capture-overlay-card"
        right={mayEdit ? <Button label="Delete" variant="quiet" compact onPress={() => remove.mutate(c.id, { onSuccess: onDeleted })} busy={remove.isPending} /> : undefined}
      >
        <View style={{ gap: 12 }}>
          {simulated.isError ? <Text color={theme.color.danger}>The draft does not simulate: {describeError(simulated.error)}</Text> : null}
          <CaptureOverlayChart series={series} unit={channel?.unit ?? 'V'} />
          <View style={{ flexDirection: 'row', gap: 8, alignItems: 'flex-end', flexWrap: 'wrap' }}>
            <View style={{ flexGrow: 1, minWidth: 160 }}>
              <TextField
                label="Shift the capture by"
                value={shiftText}
                onChangeText={setShiftText}
                error={shift.ok === false ? shift.message : undefined}
                hint="Later when positive. Used by the fit too."
                testID="capture-shift"
              />
            </View>
            <Button label="Earlier" icon="chevron-left" variant="secondary" onPress={() => nudge(-1)} accessibilityLabel="Shift the capture earlier" />
            <Button label="Later" icon="chevron-right" variant="secondary" onPress={() => nudge(1)} accessibilityLabel="Shift the capture later" />
          </View>
        </View>
      </Card>
      <Card title="Fit the design to the capture" subtitle="Source inductance and resistance from the ringing, refined against the engine." testID="capture-fit">
        <View style={{ gap: 12 }}>
          {mayEdit ? (
            <Button
              label="Fit source L and R"
              icon="bolt"
              busy={fit.isPending}
              testID="capture-fit-run"
              onPress={() => {
                setApplied(false);
                fit.mutate({ id: c.id, quantity, offset });
              }}
            />
          ) : (
            <Text muted>Only engineers of this team run fits and apply them.</Text>
          )}
          {fit.isError ? <Text color={theme.color.danger}>{describeError(fit.error)}</Text> : null}
          {fit.data ? (
            <View style={{ gap: 8 }} testID="capture-fit-result">
              {Object.entries(fit.data.values).map(([key, value]) => (
                <View key={key} style={{ flexDirection: 'row', justifyContent: 'space-between', gap: 8 }}>
                  <Text>{PARAM_LABEL[key]?.[0] ?? key}</Text>
                  <Text mono weight="semibold">
                    {formatEng(value, PARAM_LABEL[key]?.[1] ?? '', 4)}
                  </Text>
                </View>
              ))}
              <View style={{ flexDirection: 'row', justifyContent: 'space-between', gap: 8 }}>
                <Text muted>Damping ratio, ring frequency</Text>
                <Text mono>
                  ζ {fit.data.ringing.zeta.toFixed(3)}, {formatEng(fit.data.ringing.fd, 'Hz', 4)}
                </Text>
              </View>
              <View style={{ flexDirection: 'row', justifyContent: 'space-between', gap: 8 }}>
                <Text muted>Residual (RMS, largest)</Text>
                <Text mono testID="capture-fit-residual">
                  {formatEng(fit.data.residualRms, channel?.unit ?? '', 3)}, {formatEng(fit.data.residualMax, channel?.unit ?? '', 3)}
                </Text>
              </View>
              <Text variant="caption" muted>
                {fit.data.refined
                  ? fit.data.refined.converged
                    ? `Refinement converged in ${fit.data.refined.iterations} iterations.`
                    : `Refinement stopped after ${fit.data.refined.iterations} iterations without converging; check the window and the shift.`
                  : 'Log-decrement estimate only.'}
              </Text>
              {applied ? (
                <Text color={theme.color.status.pass} testID="capture-fit-applied">
                  Applied to the draft. Save a revision to check it.
                </Text>
              ) : (
                <Button label="Apply to design" icon="pass" onPress={() => applyFit(fit.data!)} busy={update.isPending} testID="capture-fit-apply" />
              )}
              {update.isError ? <Text color={theme.color.danger}>{describeError(update.error)}</Text> : null}
            </View>
          ) : null}
        </View>
      </Card>
    </>
  );
}
