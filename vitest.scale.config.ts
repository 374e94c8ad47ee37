import { defineConfig } from "vitest/config";

// The cross-instance tests (`npm run test:scale`): run by scripts/test-scale.mjs against the scale
// stack (two web instances behind HAProxy, a streaming replica), never by the plain `vitest run`.
export default defineConfig({
  resolve: { alias: { "@": import.meta.dirname } },
  test: {
    include: ["tests/scale/**/*.test.ts"],
    environment: "node",
    testTimeout: 180000,
    hookTimeout: 60000,
    fileParallelism: false,
  },
});
