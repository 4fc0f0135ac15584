// Precharge sizing runs on the server (up to thirty engine runs per request).
import { useMutation } from '@tanstack/react-query';
import { api } from '@/lib/api/client';

export interface FirstOrderFigures {
  thresholdTime: number | null;
  prechargeTime: number | null;
  peakCurrent: number;
  peakPower: number;
  energyPerAttempt: number | null;
  energyForAttempts: number | null;
  prechargeI2t: number | null;
  residualStep: number | null;
  bypassInrushPeak: number | null;
  bypassI2t: number | null;
}

export interface SimulatedFigures {
  prechargeTime: number | null;
  peakCurrent: number;
  peakPower: number;
  energyPerAttempt: number;
  energyForAttempts: number;
  prechargeI2t: number;
  residualStep: number | null;
  bypassInrushPeak: number | null;
  peakCapacitorVoltage: number;
  warnings: string[];
}

export interface PrechargeCandidate {
  resistance: number;
  series: 'E12' | 'E24';
  estimate: FirstOrderFigures;
  simulated: SimulatedFigures | null;
  simulationError?: string;
  headroom: { current: number; time: number };
  simulatedWithinLimits: boolean | null;
}

/** The engine's PrechargeSizingResult as the API returns it (JSON-safe: non-finite numbers are null). */
export interface PrechargeSizing {
  corners: {
    busVoltage: { nominal: number; min: number; max: number };
    capacitance: { nominal: number; min: number; max: number };
  };
  window: { min: number; max: number } | null;
  limits: {
    current: { minResistance: number; explanation: string };
    time: { maxResistance: number | null; explanation: string };
    threshold: { maxResistance: number | null };
  };
  binding: string;
  explanation: string;
  candidates: PrechargeCandidate[];
  recommended: number | null;
  reason: string | null;
  chosen: {
    resistance: number;
    inWindow: boolean;
    estimate: FirstOrderFigures;
    simulated: SimulatedFigures | null;
    checks: unknown[];
  } | null;
  simulationCorner: { busVoltage: number; capacitance: number };
  simulations: number;
  notes: string[];
}

export function usePrechargeSizing() {
  return useMutation({
    mutationFn: (input: Record<string, unknown>) => api<PrechargeSizing>('/api/precharge/size', { method: 'POST', body: input }),
  });
}
