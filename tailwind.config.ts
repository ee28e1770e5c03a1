import type { Config } from "tailwindcss";

// Hearth's look: warm kiln clay and ash on a soot ground, with an ember accent for
// what needs attention. Colours carry meaning only together with a word or an icon. Text
// colours meet WCAG 2.x AA contrast (4.5:1) on white and on their own tint: brass-600 on
// brass-100 5.1:1, white on verdigris-500 5.2:1 (WCAG relative-luminance formula).
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        soot: { 50: "#f6f5f3", 100: "#e9e6e1", 200: "#d3cdc4", 300: "#b3aa9c", 400: "#8d8273", 500: "#6f6557", 600: "#574f44", 700: "#403a33", 800: "#2b2723", 900: "#1b1916", 950: "#110f0d" },
        clay: { 50: "#fbf4ef", 100: "#f5e3d6", 200: "#ebc5ab", 300: "#dea079", 400: "#d07d4f", 500: "#c46535", 600: "#a84f2a", 700: "#873d25", 800: "#6d3324", 900: "#5a2c21" },
        ember: { 400: "#ff8a3d", 500: "#f26a12", 600: "#d0520a" },
        verdigris: { 100: "#dcefe9", 400: "#4fa58d", 500: "#287a64", 700: "#1e5c4c" },
        slate2: { 100: "#e2e8ef", 400: "#7d93ab", 600: "#4a6076" },
        brass: { 100: "#f6ecd0", 400: "#d5ac3f", 600: "#7a5f14" },
        oxide: { 100: "#f8dcd8", 500: "#c0392b", 700: "#8e2a20" },
      },
      fontFamily: {
        sans: ["var(--font-manrope)", "ui-sans-serif", "system-ui", "sans-serif"],
        display: ["var(--font-fraunces)", "ui-serif", "Georgia", "serif"],
        mono: ["var(--font-jetbrains)", "ui-monospace", "monospace"],
      },
      fontSize: {
        // A compact scale: the floor and the board show many numbers at once.
        "2xs": ["0.6875rem", { lineHeight: "1rem" }],
        xs: ["0.75rem", { lineHeight: "1.05rem" }],
        sm: ["0.8125rem", { lineHeight: "1.2rem" }],
        base: ["0.9375rem", { lineHeight: "1.45rem" }],
        lg: ["1.125rem", { lineHeight: "1.6rem" }],
        xl: ["1.375rem", { lineHeight: "1.8rem" }],
        "2xl": ["1.75rem", { lineHeight: "2.1rem" }],
        "3xl": ["2.25rem", { lineHeight: "2.5rem" }],
      },
      borderRadius: { card: "0.625rem" },
      boxShadow: { card: "0 1px 0 rgba(27,25,22,0.06), 0 1px 3px rgba(27,25,22,0.08)" },
    },
  },
  plugins: [],
};
export default config;
