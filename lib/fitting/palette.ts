/**
 * Partwise's cluster colours: eight hues picked to stay apart for the common kinds of
 * colour-vision deficiency (they differ in lightness as well as hue) and to keep at
 * least 3:1 contrast against white, so a swatch or a line reads on paper.
 */
export const CLUSTER_PALETTE = [
  { name: 'Moss', color: '#2f6f5e' },
  { name: 'Marigold', color: '#b7791f' },
  { name: 'Cornflower', color: '#4462c9' },
  { name: 'Brick', color: '#b8432f' },
  { name: 'Heather', color: '#7b4fa6' },
  { name: 'Lagoon', color: '#1f7f9e' },
  { name: 'Olive', color: '#6b6a1e' },
  { name: 'Rosewood', color: '#b34a7d' },
] as const;

export function clusterColor(k: number): string {
  return CLUSTER_PALETTE[k % CLUSTER_PALETTE.length].color;
}

export const HEX_COLOR = /^#[0-9a-f]{6}$/i;
