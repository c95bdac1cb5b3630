import type { Config } from "tailwindcss";

// Stratasieve's look: warm stone neutrals with one accent, a deep teal ("sieve"), and a muted
// clay for warnings. Read by src/index.css through `@config`.
export default {
  content: ["./index.html", "./src/**/*.{ts,tsx}"],
  theme: {
    extend: {
      fontFamily: { sans: ['"Inter Tight"', "system-ui", "sans-serif"] },
      colors: {
        accent: {
          50: "#effaf8",
          100: "#d6f1ec",
          200: "#aee2d9",
          500: "#1f8a7a",
          600: "#176f63",
          700: "#135a51",
          900: "#0b332e",
        },
        caution: { 50: "#fbf5ec", 200: "#edd3a8", 700: "#8a5a12" },
      },
    },
  },
} satisfies Config;
