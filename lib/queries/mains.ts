// Mains power-up (issue 9): the switch-on angle sweep and the NTC cold/hot comparison run on the
// server (tens of engine runs each); nothing is stored.
import { useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api/client';

export interface MainsSweepPoint {
  angle: number;
  peakCurrent: number;
  peakCurrentTime: number;
  i2t: number;
}

export interface MainsSweep {
  points: MainsSweepPoint[];
  worst: MainsSweepPoint & { refined: boolean };
  runs: number;
  /** The design's own switch-on angle, degrees. */
  currentAngle: number;
}

export interface MainsCheckView {
  id: string;
  label: string;
  value: number | null;
  limit: number | null;
  deratedLimit: number | null;
  status: 'pass' | 'warn' | 'fail' | 'not-checked';
  unit: string;
}

export interface MainsCase {
  startTemperature: number;
  limiterResistance: number;
  angle: number;
  metrics: {
    peakCurrent: { value: number; time: number };
    i2t: number;
    diodeI2t: number;
    surgeEquivalentCurrent: number;
    limiterEnergy: number;
    limiterPeakPower: { value: number; time: number } | null;
  };
  checks: MainsCheckView[];
}

export interface MainsColdHot {
  cold: MainsCase;
  hot: MainsCase;
  surgePulseDuration: number;
}

export function useMainsSweep(design: unknown, options: Record<string, unknown> = {}) {
  return useQuery({
    queryKey: ['mains', 'sweep', design, options],
    enabled: design !== null && design !== undefined,
    staleTime: 5 * 60_000,
    queryFn: () => api<MainsSweep>('/api/mains/sweep', { method: 'POST', body: { design, options } }),
  });
}

export function useMainsColdHot(design: unknown, enabled: boolean, options: Record<string, unknown> = {}) {
  return useQuery({
    queryKey: ['mains', 'cold-hot', design, options],
    enabled: enabled && design !== null && design !== undefined,
    staleTime: 5 * 60_000,
    queryFn: () => api<MainsColdHot>('/api/mains/cold-hot', { method: 'POST', body: { design, options } }),
  });
}
