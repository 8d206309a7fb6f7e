import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    environment: 'node',
    // A guard against hangs, not a speed check (speed is measured by `npm run bench`): tests that
    // start the command or a browser take a second or two here and more on a loaded CI machine.
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
