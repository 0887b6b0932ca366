import path from "node:path";
import { defineConfig } from "vitest/config";

const alias = {
  "@": path.resolve(import.meta.dirname),
  // The real package throws outside React Server Components; in tests the modules run in plain Node.
  "server-only": path.resolve(import.meta.dirname, "tests/support/server-only-stub.ts"),
};

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      // scrypt at OWASP cost and the property tests take seconds on a loaded 2-core machine: a guard against hangs, not a speed check.
      { resolve: { alias }, test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node", testTimeout: 30_000 } },
      {
        resolve: { alias },
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          testTimeout: 30_000,
          // Set-up hooks sign in several accounts (scrypt, N = 2^17): on a busy two-core machine that took over 20 s.
          hookTimeout: 120_000,
          // One file at a time: LibreOffice, the crash writer and the SMTP server are heavy on two cores, and a
          // worker that lingers after its file (seen when files ran side by side) is not waited for.
          pool: "forks",
          fileParallelism: false,
          // A worker that lingers after its file is not waited for long. Measured: without this the run
          // stalled after the first files; vitest's types leave it out of project options, but it is honoured.
          // @ts-expect-error see above
          teardownTimeout: 5_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          environment: "node",
          globalSetup: ["tests/e2e/global-setup.ts"],
          setupFiles: ["tests/e2e/page-errors.setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 60_000,
          fileParallelism: false,
          // A worker that lingers after its file is not waited for long. Measured: without this the run
          // stalled after the first files; vitest's types leave it out of project options, but it is honoured.
          // @ts-expect-error see above
          teardownTimeout: 5_000,
        },
      },
    ],
  },
});
