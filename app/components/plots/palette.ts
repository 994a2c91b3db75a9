/** Series colours of Saddlebook plots: distinguishable hues at even lightness, cycled for many species. */
export const SERIES_COLOURS = [
  "#1f5f8b", "#c2703a", "#4f8a56", "#8a2f25", "#6a4c93", "#2a9d8f", "#b8860b", "#5c6b73",
  "#d1495b", "#00798c", "#8d6a9f", "#3d5a80", "#9c6644", "#588157", "#e07a5f", "#264653",
];

export function seriesColour(i: number): string {
  return SERIES_COLOURS[i % SERIES_COLOURS.length];
}
