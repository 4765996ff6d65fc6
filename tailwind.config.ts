import type { Config } from "tailwindcss";

// Sumfold's own palette: ink on paper, a teal "fold" accent, and amber for cautions.
export default {
  content: ["./app/**/*.{ts,tsx}", "./lib/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        ink: { DEFAULT: "#17202e", soft: "#3b4757", faint: "#6b7787" },
        paper: { DEFAULT: "#fbfaf7", warm: "#f3f0e8", line: "#e2ddd0" },
        fold: { 50: "#e8f5f3", 100: "#c9e9e4", 500: "#1b8a7a", 600: "#147063", 700: "#0f574d", 900: "#082e29" },
        caution: { 50: "#fdf6e7", 500: "#b7791f", 700: "#8a5a12" },
      },
      fontFamily: {
        sans: ["var(--font-body)", "system-ui", "sans-serif"],
        display: ["var(--font-display)", "Georgia", "serif"],
        mono: ["var(--font-mono)", "ui-monospace", "monospace"],
      },
      maxWidth: { page: "72rem" },
    },
  },
} satisfies Config;
