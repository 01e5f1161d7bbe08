import type { Config } from "tailwindcss";

// Spillway's palette: "basin" blues for the calm, carried traffic; "spill" ambers for what overflows.
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        basin: {
          50: "#f2f7fb",
          100: "#e1edf6",
          200: "#bfd8ea",
          300: "#8fbad8",
          400: "#5896c1",
          500: "#3578a8",
          600: "#265f8a",
          700: "#1f4c70",
          800: "#1c405c",
          900: "#1a364d",
          950: "#0f2133",
        },
        spill: {
          50: "#fdf8ed",
          100: "#f9ecd0",
          200: "#f2d69c",
          300: "#ebbb63",
          400: "#e5a13b",
          500: "#d9822a",
          600: "#c06322",
          700: "#9f4820",
          800: "#823a20",
          900: "#6b301d",
        },
      },
      fontFamily: {
        sans: ["var(--font-inter)", "ui-sans-serif", "system-ui", "sans-serif"],
        mono: ["ui-monospace", "SFMono-Regular", "Menlo", "monospace"],
      },
    },
  },
};

export default config;
