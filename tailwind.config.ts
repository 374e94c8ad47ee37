import type { Config } from "tailwindcss";

// Halftrip's palette (see DEVELOPERS.md): calm neutrals; colour only for abnormal states.
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        paper: "#f6f5f1",
        card: "#ffffff",
        rule: "#d9d6cc",
        ink: "#1f2a30",
        muted: "#6b7275",
        liquid: "#8ea3ad",
        critical: "#b3261e",
        high: "#c25414",
        medium: "#9a7400",
        low: "#47698c",
      },
      fontFamily: {
        sans: ["var(--font-text)", "system-ui", "sans-serif"],
        mono: ["var(--font-figures)", "ui-monospace", "monospace"],
      },
    },
  },
  plugins: [],
};

export default config;
