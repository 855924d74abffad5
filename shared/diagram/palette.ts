/** Stagewright's colours for the diagram (DESIGN.md §8; the same values as tailwind.config.ts). */
export const INK = "#1f2a30";
export const PAPER = "#f7f5f0";
/** Survival arrows: growth, stasis, shrinkage. */
export const SPRUCE = "#2f6b5a";
/** Reproduction arrows, always dashed as well. */
export const CLAY = "#b5562f";
export const INDIGO = "#4b4f9c";
export const BRICK = "#9f2d2d";
/** A stage without a colour of its own. */
export const DEFAULT_STAGE_COLOR = "#5b6b75";
/** Dash pattern of reproduction arrows, so colour is never the only difference. */
export const REPRODUCTION_DASH = "7 5";

/** Colours offered for stages (any "#rrggbb" can be chosen as well). */
export const STAGE_COLORS: readonly { name: string; value: string }[] = [
  { name: "Slate", value: "#5b6b75" },
  { name: "Spruce", value: "#2f6b5a" },
  { name: "Moss", value: "#6b7a2e" },
  { name: "Ochre", value: "#a87a12" },
  { name: "Clay", value: "#b5562f" },
  { name: "Plum", value: "#7a3f6e" },
  { name: "Indigo", value: "#4b4f9c" },
  { name: "Sky", value: "#2f6f9f" },
];
