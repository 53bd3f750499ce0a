import { defineConfig } from 'vitest/config';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { VitePWA } from 'vite-plugin-pwa';

export default defineConfig({
  plugins: [
    react(),
    tailwindcss(),
    // The installable app: Rholog's manifest and a Workbox service worker that keeps the app shell and fonts
    // on the phone. API answers are never cached by it: field data lives in IndexedDB (src/features/offline).
    VitePWA({
      registerType: 'prompt',
      injectRegister: false,
      // The glob below already takes the icons; listed twice they would be precached twice.
      includeManifestIcons: false,
      manifest: {
        id: '/',
        name: 'Rholog',
        short_name: 'Rholog',
        description: 'Field log for locating cable faults from TDR traces, with or without signal.',
        lang: 'en',
        start_url: '/',
        scope: '/',
        display: 'standalone',
        orientation: 'any',
        background_color: '#f6f4ef',
        theme_color: '#1d2731',
        icons: [
          { src: '/icons/rholog-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
          { src: '/icons/rholog-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
          { src: '/icons/rholog-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
        ],
      },
      workbox: {
        // The shell (every page's code, the styles, the icons) and the Latin fonts the interface is set in.
        globPatterns: ['**/*.{js,css,html,svg,png}', 'assets/source-sans-3-latin-*.woff2'],
        navigateFallback: '/index.html',
        navigateFallbackDenylist: [/^\/api\//],
        cleanupOutdatedCaches: true,
        runtimeCaching: [
          {
            // Any other font file a page asks for (another script's subset) is kept once fetched.
            urlPattern: ({ request, sameOrigin }) => sameOrigin && request.destination === 'font',
            handler: 'CacheFirst',
            options: { cacheName: 'rholog-fonts', expiration: { maxEntries: 60 } },
          },
        ],
      },
    }),
  ],
  build: { outDir: 'dist/client', sourcemap: false, chunkSizeWarningLimit: 900 },
  test: {
    projects: [
      {
        extends: true,
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node', testTimeout: 60_000 },
      },
      {
        extends: true,
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          environment: 'node',
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: { name: 'client', include: ['tests/client/**/*.test.tsx'], environment: 'jsdom', setupFiles: ['tests/client/setup.ts'] },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          testTimeout: 120_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
