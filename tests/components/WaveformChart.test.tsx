import { render, screen } from '@testing-library/react-native';
import { WaveformChart } from '@/components/charts/WaveformChart';
import { findPeak, layoutChart, type WaveformData } from '@/components/charts/waveformGeometry';
import { ThemeProvider } from '@/lib/theme';

// An underdamped step: vC = 400·(1 − e^(−αt)·cos ωt), peaking near π/ω; i = C·dvC/dt.
function ringing(): WaveformData {
  const n = 801;
  const duration = 2e-3;
  const alpha = 2000;
  const omega = 2 * Math.PI * 2000;
  const c = 100e-6;
  const t: number[] = [];
  const vC: number[] = [];
  const i: number[] = [];
  for (let k = 0; k < n; k++) {
    const s = (duration * k) / (n - 1);
    t.push(s);
    vC.push(400 * (1 - Math.exp(-alpha * s) * Math.cos(omega * s)));
    i.push(c * 400 * Math.exp(-alpha * s) * (alpha * Math.cos(omega * s) + omega * Math.sin(omega * s)));
  }
  return { t, vC, v: t.map(() => 400), i };
}

const WIDTH = 600;

function renderChart(data: WaveformData, peaks?: Parameters<typeof WaveformChart>[0]['peaks']) {
  return render(
    <ThemeProvider scheme="light">
      <WaveformChart waveform={data} width={WIDTH} peaks={peaks} />
    </ThemeProvider>,
  );
}

describe('WaveformChart peak markers', () => {
  it('puts the capacitor-voltage marker at the time and value of the largest sample', () => {
    const data = ringing();
    renderChart(data);
    const peak = findPeak(data.t, data.vC)!;
    // Derived: the first maximum of 1 − e^(−αt)cos ωt is just before π/ω = 250 µs.
    expect(peak.time).toBeGreaterThan(200e-6);
    expect(peak.time).toBeLessThan(260e-6);
    expect(peak.value).toBeGreaterThan(400);

    const geometry = layoutChart(data, WIDTH, data.t[data.t.length - 1], [], 180);
    const voltage = geometry.panels.find((p) => p.key === 'voltage')!;
    const marker = screen.getByTestId('peak-vC');
    expect(Number(marker.props.cx)).toBeCloseTo(voltage.x(peak.time), 6);
    expect(Number(marker.props.cy)).toBeCloseTo(voltage.y(peak.value), 6);
  });

  it('puts the current marker at the peak of the current trace, on the current panel', () => {
    const data = ringing();
    renderChart(data);
    const peak = findPeak(data.t, data.i)!;
    const geometry = layoutChart(data, WIDTH, data.t[data.t.length - 1], [], 180);
    const current = geometry.panels.find((p) => p.key === 'current')!;
    const marker = screen.getByTestId('peak-i');
    expect(Number(marker.props.cx)).toBeCloseTo(current.x(peak.time), 6);
    expect(Number(marker.props.cy)).toBeCloseTo(current.y(peak.value), 6);
  });

  it("uses the engine's exact peak when given, not the nearest sample", () => {
    const data = ringing();
    const exact = { value: 612.3, time: 0.2471e-3 };
    renderChart(data, { vC: exact });
    const geometry = layoutChart(data, WIDTH, data.t[data.t.length - 1], [], 180);
    const voltage = geometry.panels.find((p) => p.key === 'voltage')!;
    const marker = screen.getByTestId('peak-vC');
    expect(Number(marker.props.cx)).toBeCloseTo(voltage.x(exact.time), 6);
    expect(Number(marker.props.cy)).toBeCloseTo(voltage.y(exact.value), 6);
    expect(screen.getByTestId('waveform-chart-summary')).toHaveTextContent(/Capacitor voltage peaks at 612 V at 247 µs/);
  });
});
