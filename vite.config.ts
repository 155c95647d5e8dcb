import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';
import { quasar, transformAssetUrls } from '@quasar/vite-plugin';
import { VitePWA } from 'vite-plugin-pwa';
import { fileURLToPath } from 'node:url';

export default defineConfig({
  resolve: {
    alias: [
      { find: '@', replacement: fileURLToPath(new URL('./src', import.meta.url)) },
      { find: '@shared', replacement: fileURLToPath(new URL('./shared', import.meta.url)) },
      // The service worker's page-side helper in its ES2017 build (the package's "module" is the ES5 one):
      // about 1 KB gzip less before the Bench is usable; every browser that runs the app runs ES2022.
      { find: /^workbox-window$/, replacement: fileURLToPath(new URL('./node_modules/workbox-window/build/workbox-window.prod.mjs', import.meta.url)) },
    ],
  },
  plugins: [
    vue({ template: { transformAssetUrls } }),
    quasar({ sassVariables: fileURLToPath(new URL('./src/css/quasar-variables.sass', import.meta.url)) }),
    VitePWA({
      // A new version waits for the technician's consent: never reload mid-core.
      registerType: 'prompt',
      injectRegister: false,
      includeAssets: ['favicon.svg', 'icons/*.png'],
      manifest: {
        name: 'Corewright',
        short_name: 'Corewright',
        description: 'Build master-keyed interchangeable cores at the bench: pinning, loading, key checks and records, offline.',
        theme_color: '#2E3A40',
        background_color: '#F6F3EC',
        display: 'standalone',
        orientation: 'any',
        start_url: '/',
        scope: '/',
        icons: [
          { src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png' },
          { src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png' },
          { src: '/icons/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
          { src: '/favicon.svg', sizes: 'any', type: 'image/svg+xml' },
        ],
      },
      workbox: {
        // The shell only, fonts and icons included; API calls stay network-only (the outbox handles them).
        globPatterns: ['**/*.{js,css,html,woff,woff2,ttf,svg,png,ico,webmanifest}'],
        navigateFallback: '/index.html',
        navigateFallbackDenylist: [/^\/api(\/|$)/],
        cleanupOutdatedCaches: true,
        maximumFileSizeToCacheInBytes: 4 * 1024 * 1024,
      },
      devOptions: { enabled: false },
    }),
  ],
  server: {
    port: 5173,
    proxy: { '/api': 'http://127.0.0.1:8080' },
  },
  build: {
    target: 'es2022',
    chunkSizeWarningLimit: 800,
    modulePreload: {
      // The first load of the tablet is the budget (JS before the Bench is usable, npm run bench): the app's
      // first chunk lists, for each lazy page, the files to fetch with it. Only the tablet's path keeps that list;
      // an office page fetches its parts when it imports them (a desktop on the office network).
      // index.html's own preloads (the first chunk's static imports) are kept as they are.
      resolveDependencies: (filename, deps, { hostType }) =>
        hostType === 'html' || /(^|\/)(Bench\w*Page|UnlockPage|SignInPage|MainLayout)-/.test(filename) ? deps : [],
    },
  },
});
