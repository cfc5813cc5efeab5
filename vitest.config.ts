import { defineConfig } from 'vitest/config';

// Unit and server tests (Node). Angular component specs under src/ run through `ng test`.
export default defineConfig({
  test: {
    include: ['shared/**/*.spec.ts', 'server/**/*.spec.ts', 'datasets-demo/**/*.spec.ts', 'tests/cross/**/*.spec.ts', 'runner/**/*.spec.ts'],
    environment: 'node',
    pool: 'forks',
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
