import { render, screen } from '@testing-library/react-native';
import { CircuitSketch, mainsSketchOf } from '@/components/designs/CircuitSketch';
import { sketchParts } from '@/components/designs/designForm';
import { ThemeProvider } from '@/lib/theme';
import { mainsPreset } from '@/sim/mains';

const dcDraft = {
  source: { voltage: '800 V', resistance: '20 mΩ', inductance: '5 µH' },
  precharge: { resistance: '47 Ω', bypass: { fraction: 0.95, delay: '20 ms' } },
  capacitor: { capacitance: '940 µF', esr: '5 mΩ' },
  bleeder: { resistance: '100 kΩ' },
  duration: '1 s',
};

function renderSketch(draft: Record<string, unknown>) {
  return render(
    <ThemeProvider scheme="light">
      <CircuitSketch parts={sketchParts(draft)} />
    </ThemeProvider>,
  );
}

describe('CircuitSketch', () => {
  it('draws a battery, and no AC source or bridge, for a DC design', () => {
    renderSketch(dcDraft);
    expect(screen.getByTestId('circuit-sketch-battery')).toBeTruthy();
    expect(screen.queryByTestId('circuit-sketch-ac-source')).toBeNull();
    expect(screen.queryByTestId('circuit-sketch-bridge')).toBeNull();
    expect(screen.getByLabelText(/^Circuit: source 800 V, precharge resistor 47 Ω with a bypass contactor/)).toBeTruthy();
  });

  it('draws the AC source, the 4-diode bridge and the NTC for the single-phase wall charger, and no battery', () => {
    renderSketch(mainsPreset as Record<string, unknown>);
    expect(screen.getByTestId('circuit-sketch-ac-source')).toBeTruthy();
    expect(screen.getByTestId('circuit-sketch-bridge')).toBeTruthy();
    expect(screen.getByTestId('circuit-sketch-ntc')).toBeTruthy();
    expect(screen.queryByTestId('circuit-sketch-battery')).toBeNull();
    expect(screen.queryByTestId('circuit-sketch-relay')).toBeNull();
    expect(screen.getAllByTestId('circuit-sketch-bridge-diode')).toHaveLength(4);
    expect(
      screen.getByLabelText(
        /^Circuit: single-phase AC mains 230 V 50 Hz, line impedance, NTC limiter 10 Ω at 25 °C, diode bridge \(4 diodes\), DC-link capacitor 470 µF/,
      ),
    ).toBeTruthy();
    // Precharge and filter belong to DC designs: not listed as missing here.
    expect(screen.getByTestId('circuit-sketch-absent')).toHaveTextContent('Not fitted: damping branch.');
  });

  it('draws six diodes, the limiter resistor after the bridge and its bypass relay for a three-phase design', () => {
    renderSketch({
      ...mainsPreset,
      mains: { kind: 'three-phase', voltage: '400 V', limiter: { kind: 'resistor', resistance: '22 Ω', bypass: { delay: '50 ms' } } },
    });
    expect(screen.getAllByTestId('circuit-sketch-bridge-diode')).toHaveLength(6);
    expect(screen.getByTestId('circuit-sketch-limiter-resistor')).toBeTruthy();
    expect(screen.getByTestId('circuit-sketch-relay')).toBeTruthy();
    expect(screen.queryByTestId('circuit-sketch-ntc')).toBeNull();
    expect(screen.getByLabelText(/three-phase AC mains 400 V 50 Hz, diode bridge \(6 diodes\), limiter resistor 22 Ω with a bypass relay/)).toBeTruthy();
  });

  it('reads a half-edited mains draft without failing', () => {
    expect(mainsSketchOf({ mains: { voltage: '23', limiter: { kind: 'ntc' } } })).toEqual({
      kind: 'single-phase',
      voltage: 23,
      frequency: 50,
      lineImpedance: false,
      limiter: { kind: 'ntc', resistance: null, bypass: false },
    });
    expect(mainsSketchOf(dcDraft)).toBeNull();
  });
});
