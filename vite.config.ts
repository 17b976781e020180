import { fileURLToPath, URL } from 'node:url';
import { defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';

const apiPort = Number(process.env.PORT ?? 3000);

export default defineConfig({
  plugins: [vue()],
  resolve: {
    alias: {
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
      '@client': fileURLToPath(new URL('./client', import.meta.url)),
    },
  },
  server: {
    port: 5173,
    // `npm run dev`: the API runs on its own port behind this proxy.
    proxy: { '/api': { target: `http://127.0.0.1:${apiPort}`, changeOrigin: false } },
  },
  build: { outDir: 'dist/client', emptyOutDir: true, chunkSizeWarningLimit: 1500 },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: 'node',
          environment: 'node',
          include: ['tests/core/**/*.test.ts', 'tests/server/**/*.test.ts'],
          // Heavy jobs run in forked processes (2–3 s to start on a loaded 2-core machine); give them room.
          testTimeout: 60_000,
          // Building a demo app (migrations, seed, a released wave) takes seconds on a loaded 2-core machine.
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'client',
          environment: 'happy-dom',
          include: ['tests/client/**/*.test.ts'],
          setupFiles: ['tests/client/setup.ts'],
        },
      },
    ],
  },
});
