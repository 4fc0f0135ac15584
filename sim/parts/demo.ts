/**
 * Demo parts of the fictional team Northfold Motion (DESIGN.md "Demo world"): the parts behind its
 * five demo designs. Invented part numbers and values; no real manufacturer or part.
 */
import { parsePart, type Part, type PartInput } from './schema';

const MAKER = 'Northfold Motion (in-house specification)';

const DEMO_PART_INPUTS: PartInput[] = [
  {
    kind: 'capacitor',
    partNumber: 'NF-CAP-940-900',
    description: 'Depot charger DC-link film capacitor bank, 940 µF',
    maker: MAKER,
    capacitance: '940 µF',
    tolerance: '10 %',
    ratedVoltage: '900 V',
    surgeVoltage: '990 V',
    esr: '3 mΩ',
  },
  {
    kind: 'capacitor',
    partNumber: 'NF-CAP-1500-63',
    description: 'Scooter controller bus capacitors, low ESR, 1.5 mF',
    maker: MAKER,
    capacitance: '1.5 mF',
    tolerance: '20 %',
    ratedVoltage: '63 V',
    surgeVoltage: '72 V',
    esr: '8 mΩ',
  },
  {
    kind: 'capacitor',
    partNumber: 'NF-CAP-470-450',
    description: 'Wall charger bulk electrolytic, 470 µF',
    maker: MAKER,
    capacitance: '470 µF',
    tolerance: '20 %',
    ratedVoltage: '450 V',
    surgeVoltage: '495 V',
    esr: '150 mΩ',
  },
  {
    kind: 'capacitor',
    partNumber: 'NF-CAP-1U2-1000',
    description: 'Gate-drive test snubber capacitor, 1.2 nF',
    maker: MAKER,
    capacitance: '1.2 nF',
    tolerance: '5 %',
    ratedVoltage: '1000 V',
  },
  {
    kind: 'resistor',
    partNumber: 'NF-RES-47R-PRE',
    description: 'Depot charger precharge resistor, wirewound, pulse rated',
    maker: MAKER,
    resistance: '47 Ω',
    tolerance: '5 %',
    pulseEnergy: '450 J',
    pulseDuration: '200 ms',
    peakPower: '20 kW',
    continuousPower: '50 W',
  },
  {
    kind: 'resistor',
    partNumber: 'NF-RES-2K2-BLD',
    description: 'DC-link bleeder, 2.2 kΩ',
    maker: MAKER,
    resistance: '2.2 kΩ',
    tolerance: '5 %',
    continuousPower: '400 W',
  },
  {
    kind: 'resistor',
    partNumber: 'NF-RES-1R5-DMP',
    description: 'Cargo-bike filter damping resistor',
    maker: MAKER,
    resistance: '1.5 Ω',
    tolerance: '1 %',
    continuousPower: '3 W',
  },
  {
    kind: 'inductor',
    partNumber: 'NF-IND-10U-40A',
    description: 'Cargo-bike input filter choke, 10 µH',
    maker: MAKER,
    inductance: '10 µH',
    tolerance: '15 %',
    saturationCurrent: '40 A',
    dcr: '2.5 mΩ',
  },
  {
    kind: 'contactor',
    partNumber: 'NF-CON-800-250',
    description: 'Depot charger bypass contactor, 800 V DC',
    maker: MAKER,
    makeCurrent: '600 A',
    carryCurrent: '250 A',
    ratedVoltage: '1000 V',
  },
  {
    kind: 'fuse',
    partNumber: 'NF-FUS-250-1000',
    description: 'Depot charger DC-link fuse',
    maker: MAKER,
    meltingI2t: '18 kA²s',
    ratedCurrent: '250 A',
    ratedVoltage: '1000 V',
  },
  {
    kind: 'semiconductor',
    partNumber: 'NF-DIO-800-150',
    description: 'Wall charger bridge rectifier diode',
    maker: MAKER,
    blockingVoltage: '800 V',
    surgeCurrent: '150 A',
    i2t: '112 A²s',
  },
  {
    kind: 'semiconductor',
    partNumber: 'NF-SW-1200-60',
    description: 'Gate-drive test half-bridge switch, 1200 V',
    maker: MAKER,
    blockingVoltage: '1200 V',
  },
];

/** The demo parts, validated (a fresh copy on every call). */
export function demoParts(): Part[] {
  return DEMO_PART_INPUTS.map((input) => parsePart(input));
}
