import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts", "rules/**/*.test.ts", "src/**/*.test.ts"],
    // CLI tests spawn the built tool; they need time on a loaded 2-core machine.
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
