import { defineConfig } from 'vitest/config';
import path from 'node:path';

// `server-only` throws outside Next's server build; tests load the server modules directly, so it
// resolves to the package's empty module here (DEVELOPERS.md, "Server-only modules").
const alias = { '@': path.resolve(__dirname), 'server-only': path.resolve(__dirname, 'node_modules/server-only/empty.js') };

// Server logs (lib/log.ts) at warn and above only, unless asked: a line per request would bury the report.
const env = { LOG_LEVEL: process.env.LOG_LEVEL ?? 'warn' };

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node', env },
      },
      {
        resolve: { alias },
        test: {
          name: 'integration',
          env,
          include: ['tests/integration/**/*.test.ts'],
          environment: 'node',
          setupFiles: ['tests/integration/setup.ts'],
          // Each file gets its own temporary database; files run one after another
          // so they never fight over the shared mail catcher.
          fileParallelism: false,
          testTimeout: 30000,
          hookTimeout: 60000,
        },
      },
    ],
  },
});
