// react-native-web turns `dataSet` into data-* attributes; React Native's types do not list it.
export function webData(data: Record<string, string>): Record<string, unknown> {
  return { dataSet: data };
}

/** react-native-web adds `hovered` to Pressable's state; React Native's types know only `pressed`. */
export function isHovered(state: { pressed: boolean }): boolean {
  return !!(state as { hovered?: boolean }).hovered;
}
