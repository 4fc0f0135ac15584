import { View } from 'react-native';
import { WaveformChart, type WaveformData } from '@/components/charts/WaveformChart';
import { ChecksTable, type CheckRow } from '@/components/checks/ChecksTable';
import { Card } from '@/components/ui/Card';
import { Text } from '@/components/ui/Text';
import { useTheme } from '@/lib/theme';
import { HighVoltageNotice, NoticeLine, type NoticeView } from './HighVoltageNotice';
import { metricTime, metricValue, MetricsCard } from './MetricsCard';
import { ratingLinesFrom } from './ratingLines';
import { SolverLine } from './SolverLine';

export interface ResultsView {
  metrics: Record<string, unknown>;
  checks: CheckRow[];
  notices: NoticeView[];
  solvers: unknown;
  warnings: unknown[];
  waveform: WaveformData | null;
  elapsedMs?: number;
}

function peak(metrics: Record<string, unknown>, key: string) {
  const value = metricValue(metrics, key);
  const time = metricTime(metrics, key);
  return value !== null && time !== null ? { value, time } : null;
}

function warningText(w: unknown): string {
  if (typeof w === 'string') return w;
  if (w && typeof w === 'object' && typeof (w as { message?: unknown }).message === 'string')
    return (w as { message: string }).message;
  return JSON.stringify(w);
}

/** The transient and its verdict: notice, chart, checks, figures, how it was solved. */
export function ResultsPanel({ results, stale }: { results: ResultsView; stale?: boolean }) {
  const theme = useTheme();
  const hv = results.notices.filter((n) => n.id === 'high-voltage');
  const other = results.notices.filter((n) => n.id !== 'high-voltage');
  return (
    <View style={{ gap: theme.space.m }} testID="results-panel">
      {hv.map((n) => (
        <HighVoltageNotice key={n.id} notice={n} />
      ))}
      <Card title="Transient" testID="transient-card">
        {results.waveform ? (
          <WaveformChart
            waveform={results.waveform}
            stale={stale}
            ratingLines={ratingLinesFrom(results.checks)}
            peaks={{
              vC: peak(results.metrics, 'peakCapacitorVoltage'),
              v: peak(results.metrics, 'peakBusVoltage'),
              i: peak(results.metrics, 'peakCurrent'),
            }}
          />
        ) : (
          <Text muted>The stored result has no waveform.</Text>
        )}
        <SolverLine solvers={results.solvers} elapsedMs={results.elapsedMs} />
      </Card>
      <Card title="Margins" subtitle="Each rating against what the transient does to it; failures first." testID="margins-card">
        <ChecksTable checks={results.checks} />
      </Card>
      <MetricsCard metrics={results.metrics} />
      {other.length || results.warnings.length ? (
        <Card title="Notes on this run" testID="run-notes">
          {other.map((n) => (
            <NoticeLine key={n.id} notice={n} />
          ))}
          {results.warnings.map((w, k) => (
            <NoticeLine
              key={`w${k}`}
              notice={{ id: `warning-${k}`, title: 'Engine', text: warningText(w), severity: 'caution' }}
            />
          ))}
        </Card>
      ) : null}
    </View>
  );
}
