/** Sequential shading from paper to spruce (DESIGN.md §8), for elasticities and other shares in [0, 1]. */

const PAPER = [0xf7, 0xf5, 0xf0] as const;
const SPRUCE = [0x2f, 0x6b, 0x5a] as const;

/** Background colour for t in [0, 1] (clamped), and whether text on it should be light. */
export function shade(t: number): { background: string; lightText: boolean } {
  const x = Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0));
  const rgb = PAPER.map((p, i) => Math.round(p + (SPRUCE[i]! - p) * x));
  return { background: `rgb(${rgb.join(", ")})`, lightText: x > 0.55 };
}
