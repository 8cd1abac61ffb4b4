import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));

export default defineConfig({
  resolve: {
    alias: {
      '@/': here('./src/'),
      '@schemas/': here('./server/schemas/'),
    },
  },
  test: {
    environment: 'node',
    pool: 'forks',
    maxWorkers: 2,
    testTimeout: 60_000,
    hookTimeout: 120_000,
    globalSetup: ['tests/helpers/global-setup.ts'],
    reporters: ['default'],
    sequence: { groupOrder: 0 },
    projects: [
      {
        extends: true,
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'] },
      },
      {
        extends: true,
        test: { name: 'api', include: ['tests/api/**/*.test.ts'] },
      },
      {
        extends: true,
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          fileParallelism: false,
          testTimeout: 180_000,
          sequence: { groupOrder: 1 },
        },
      },
      {
        // A Galera cluster of its own (three MariaDB nodes, HAProxy, two server processes): run
        // after everything else, alone on the machine (npm run test:cluster runs only these).
        extends: true,
        test: {
          name: 'cluster',
          include: ['tests/cluster/**/*.test.ts'],
          fileParallelism: false,
          testTimeout: 300_000,
          hookTimeout: 400_000,
          sequence: { groupOrder: 2 },
        },
      },
    ],
  },
});
