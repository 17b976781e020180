import { fileURLToPath, URL } from 'node:url';
import { defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';
import { VitePWA } from 'vite-plugin-pwa';

const apiPort = Number(process.env.PORT ?? 3000);

export default defineConfig({
  plugins: [
    vue(),
    // The installed app shell: the built client precached so a tablet reopens it with no network.
    // Registered by client/pwa.ts only in secure contexts (HTTPS or localhost).
    VitePWA({
      injectRegister: false,
      registerType: 'autoUpdate',
      manifest: {
        name: 'Aislewright',
        short_name: 'Aislewright',
        description: 'Picking routes and trips for the warehouse floor',
        start_url: '/pick',
        display: 'standalone',
        background_color: '#F4F6F8',
        theme_color: '#0B4A52',
        icons: [{ src: '/app-icon.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' }],
      },
      workbox: {
        globPatterns: ['**/*.{js,css,html,svg,woff2}'],
        maximumFileSizeToCacheInBytes: 4 * 1024 * 1024,
        // Every page of the app opens from the precached shell; the API never does.
        navigateFallback: '/index.html',
        navigateFallbackDenylist: [/^\/api\//],
        cleanupOutdatedCaches: true,
        // API answers carry Cache-Control: no-store and hold live picking data: always the network, never a cache.
        runtimeCaching: [{ urlPattern: ({ url }) => url.pathname.startsWith('/api/'), handler: 'NetworkOnly' }],
      },
    }),
  ],
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
          // Mounting a page with Naive UI took over 5 s (Vitest's default) at load 15 on 2 cores.
          testTimeout: 30_000,
        },
      },
    ],
  },
});
