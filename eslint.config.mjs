import nextVitals from "eslint-config-next/core-web-vitals";
import nextTs from "eslint-config-next/typescript";

const config = [
  ...nextVitals,
  ...nextTs,
  {
    rules: {
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_", destructuredArrayIgnorePattern: "^_" }],
    },
  },
  { ignores: [".next/**", ".next-*/**", ".data/**", ".worker/**", "node_modules/**", "next-env.d.ts", "test-results/**", "playwright-report/**"] },
];

export default config;
