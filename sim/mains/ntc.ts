/**
 * The NTC thermistor: the β-parameter law and its simple thermal model.
 *
 *   R(T) = R25·exp[β·(1/T − 1/T25)],  T25 = 298.15 K          (the β-parameter model; standard
 *                                                              thermistor texts, REFERENCE §7 [pub])
 *   C_th·dT/dt = P − δ·(T − T_amb),   P = i²·R(T)             (a lumped body with heat capacity C_th
 *                                                              and dissipation constant δ; [cp])
 * Temperatures in K.
 */

/** 25 °C in K: the reference temperature of R25. */
export const T25 = 298.15;

/** R(T) of the β-model, Ω. */
export function ntcResistance(r25: number, beta: number, temperature: number): number {
  return r25 * Math.exp(beta * (1 / temperature - 1 / T25));
}

/** dT/dt of the lumped thermal model, K/s. */
export function ntcHeating(
  power: number,
  temperature: number,
  heatCapacity: number,
  dissipationConstant: number,
  ambient: number,
): number {
  return (power - dissipationConstant * (temperature - ambient)) / heatCapacity;
}
