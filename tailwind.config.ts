import type { Config } from "tailwindcss";

// Tanklore's palette: deep "peat" water greens and a warm "reed" accent, chosen for contrast
// (body text on paper is above 7:1; accents on paper above 4.5:1).
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./features/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        paper: "#f7f5ef",
        ink: "#1b2622",
        peat: { 50: "#eef5f2", 100: "#d5e7df", 300: "#8fbfac", 500: "#2f7a63", 700: "#1d5444", 900: "#0f2e26" },
        reed: { 100: "#f8ecd2", 300: "#e7c27a", 500: "#b7791f", 700: "#7a4f12" },
        alarm: { 100: "#fbe3e0", 500: "#b3261e", 700: "#7f1a15" },
      },
      fontFamily: {
        sans: ["var(--font-body)", "system-ui", "sans-serif"],
        display: ["var(--font-display)", "Georgia", "serif"],
      },
    },
  },
};

export default config;
