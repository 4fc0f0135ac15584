// The engine calls that can take seconds (sweeps, sizing with re-simulation, cold/hot runs): the
// server runs them on the engine pool's worker threads (offload.ts) so that they never hold up the
// event loop. Single checks stay on the main thread: they take milliseconds.
export const OFFLOADED = [
  'runMainsSweep',
  'runMainsColdHot',
  'sizePrechargeStateless',
  'sizePrechargeForDesign',
  'runSnubber',
  'runStability',
] as const;
export type OffloadedCall = (typeof OFFLOADED)[number];
