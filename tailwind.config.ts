import type { Config } from "tailwindcss";

// Stagewright's palette (DESIGN.md §8). The one source of truth for colours:
// src/styles.css loads this file with `@config`.
// Contrast on paper: ink 13.5:1, spruce 5.7:1, indigo 6.7:1, brick 6.7:1;
// clay 4.4:1 and ochre 3.5:1 are below AA for body text, so they mark
// borders, arrows and icons while the words beside them stay in ink.
export default {
  theme: {
    extend: {
      colors: {
        ink: "#1f2a30",
        paper: "#f7f5f0",
        spruce: "#2f6b5a", // survival and growth
        clay: "#b5562f", // reproduction
        indigo: "#4b4f9c", // accents: links, primary actions, focus
        ochre: "#a87a12", // warnings
        brick: "#9f2d2d", // errors and destructive actions
      },
      fontFamily: {
        sans: ['"Atkinson Hyperlegible"', "ui-sans-serif", "system-ui", "sans-serif"],
      },
    },
  },
} satisfies Config;
