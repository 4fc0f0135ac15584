/**
 * The four starting designs, from Northfold Motion's (fictional) product line. Values are plausible
 * for the application, and the ratings are invented for the demo: they are chosen so that the
 * margins show a mix of pass, warn and fail across the presets. examples/*.json hold the same
 * designs (a test keeps them in step).
 */
import type { DesignInput } from './design';

export interface Preset {
  id: 'dc-link-precharge' | 'lc-filter' | 'hot-plug' | 'switch-turn-off';
  title: string;
  summary: string;
  design: DesignInput;
}

export const presets: Preset[] = [
  {
    id: 'dc-link-precharge',
    title: 'Depot charger DC link, 800 V',
    summary:
      '940 µF charged through a 47 Ω precharge resistor; the bypass contactor closes 20 ms after the capacitor reaches 95 %. A bleeder discharges the link after shutdown.',
    design: {
      name: 'Depot charger DC link',
      notes: 'Northfold Motion depot charger, 800 V DC link with precharge and bypass contactor (demo values).',
      source: { voltage: '800 V', resistance: '20 mΩ', inductance: '5 µH' },
      precharge: { resistance: '47 Ω', bypass: { when: 'voltage', fraction: 0.95, delay: '20 ms' } },
      capacitor: { capacitance: '940 µF', esr: '25 mΩ' },
      bleeder: { resistance: '47 kΩ' },
      duration: '300 ms',
      ratings: {
        capacitorVoltage: '900 V',
        capacitorSurgeVoltage: '990 V',
        prechargePulseEnergy: '320 J',
        prechargePeakPower: '12 kW',
        prechargeContinuousPower: '100 W',
        contactorMakeCurrent: '500 A',
        contactorCarryCurrent: '250 A',
        fuseMeltingI2t: '60 A²s',
        cableI2t: '20 kA²s',
      },
    },
  },
  {
    id: 'lc-filter',
    title: 'Cargo-bike drive, 96 V',
    summary:
      'An LC input filter in front of a 1.2 kW motor inverter (a constant-power load that starts 2 ms after power-up), damped by an RC branch across the filter capacitor.',
    design: {
      name: 'Cargo-bike drive input filter',
      notes: 'Northfold Motion cargo-bike drive: 22 µH / 220 µF filter, 0.22 Ω + 680 µF damping branch (demo values).',
      source: { voltage: '96 V', resistance: '50 mΩ', inductance: '1 µH' },
      filter: { inductance: '22 µH', resistance: '30 mΩ' },
      capacitor: { capacitance: '220 µF', esr: '20 mΩ' },
      damping: { resistance: '0.22 Ω', capacitance: '680 µF' },
      load: { kind: 'power', value: '1.2 kW', start: '2 ms', undervoltage: '48 V' },
      duration: '10 ms',
      ratings: {
        capacitorVoltage: '160 V',
        capacitorSurgeVoltage: '184 V',
        inductorSaturationCurrent: '120 A',
        switchVoltage: '150 V',
        fuseMeltingI2t: '40 A²s',
      },
    },
  },
  {
    id: 'hot-plug',
    title: 'Scooter controller, 48 V',
    summary:
      'A 48 V battery hot-plugged onto 1.5 mF of low-ESR capacitors with no precharge: a little cable inductance and resistance set the inrush and the overshoot.',
    design: {
      name: 'Scooter controller hot-plug',
      notes: 'Northfold Motion scooter controller: battery connector closes onto the DC bus capacitors (demo values).',
      source: { voltage: '48 V', resistance: '15 mΩ', inductance: '0.5 µH' },
      capacitor: { capacitance: '1.5 mF', esr: '5 mΩ' },
      duration: '1 ms',
      ratings: {
        capacitorVoltage: '63 V',
        capacitorSurgeVoltage: '72 V',
        switchVoltage: '60 V',
        fuseMeltingI2t: '400 A²s',
        cableI2t: '5 kA²s',
        diodeSurgeCurrent: '1 kA',
      },
    },
  },
  {
    id: 'switch-turn-off',
    title: 'Gate-drive test, 600 V bus',
    summary:
      'A 40 A turn-off through 25 nH of loop inductance into the switch’s 300 pF, with an RC snubber as the damping branch: the switch sees the bus voltage plus the ring.',
    design: {
      name: 'Half-bridge turn-off overshoot',
      notes:
        'Northfold Motion gate-drive test: 40 A commutates into the switch capacitance and a 10 Ω / 1.2 nF snubber (demo values).',
      source: { voltage: '600 V', inductance: '25 nH' },
      capacitor: { capacitance: '300 pF', esr: '0.5 Ω' },
      damping: { resistance: '10 Ω', capacitance: '1.2 nF' },
      initial: { capacitorVoltage: 0, inductorCurrent: '40 A' },
      duration: '200 ns',
      ratings: {
        switchVoltage: '1200 V',
      },
    },
  },
];
