/**
 * The mains power-up preset, from Northfold Motion's (fictional) product line: the wall charger's
 * front end. Values are plausible for a 230 V charger and invented for the demo, ratings included:
 * they are chosen so that the cold start passes where the hot restart does not.
 * examples/mains-wall-charger.json holds the same design (a test keeps them in step).
 */
import type { MainsDesignInput } from './schema';

export interface MainsPreset {
  id: 'mains-wall-charger';
  title: string;
  summary: string;
  design: MainsDesignInput;
}

/** The design input: 230 V, 50 Hz, bridge rectifier, 470 µF, 10 Ω NTC (β 3500 K), switched on at the mains peak. */
export const mainsPreset: MainsDesignInput = {
  name: 'Wall charger front end',
  notes:
    'Northfold Motion wall charger: 230 V mains through a bridge rectifier onto 470 µF, inrush limited by a 10 Ω NTC (demo values). The NTC is held at its start temperature: its self-heating only lowers the inrush.',
  mains: {
    kind: 'single-phase',
    voltage: '230 V',
    frequency: '50 Hz',
    angle: '90°',
    lineResistance: '0.3 Ω',
    lineInductance: '50 µH',
    diode: { forwardVoltage: '0.9 V', slopeResistance: '25 mΩ' },
    limiter: { kind: 'ntc', r25: '10 Ω', beta: '3500 K', startTemperature: '25 °C' },
  },
  capacitor: { capacitance: '470 µF', esr: '150 mΩ' },
  bleeder: { resistance: '470 kΩ' },
  load: { kind: 'resistance', value: '1.5 kΩ', start: '20 ms' },
  duration: '200 ms',
  ratings: {
    capacitorVoltage: '400 V',
    capacitorSurgeVoltage: '450 V',
    prechargePulseEnergy: '60 J',
    prechargePeakPower: '25 kW',
    prechargeContinuousPower: '5 W',
    fuseMeltingI2t: '10 A²s',
    diodeSurgeCurrent: '200 A',
    diodeI2t: '160 A²s',
  },
};

export const mainsPresetEntry: MainsPreset = {
  id: 'mains-wall-charger',
  title: 'Wall charger front end, 230 V mains',
  summary:
    'A bridge rectifier charging 470 µF from 230 V mains through a 10 Ω NTC, switched on at the mains peak; compare a cold start with a hot restart, when the NTC has little resistance left.',
  design: mainsPreset,
};
