import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // Reference checks spawn Debian's python3; give them room on a 2-core machine.
    testTimeout: 60_000,
    benchmark: { include: ['test/bench/**/*.bench.ts'] },
  },
});
