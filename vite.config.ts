import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { VitePWA } from 'vite-plugin-pwa';
import { CACHE_BASEMAP_TILES, CACHE_MAP_DATA, CACHE_PHOTOS, CACHE_SPAN_TILES } from './src/lib/offline-caches.ts';

// Map assets the server serves at fixed addresses: precached beside the app shell so the map opens with no signal.
// The revision changes with every build, so a new version fetches them again.
const BUILD_REVISION = String(Date.now());
const MAP_ASSETS = [
  '/map/style.json',
  '/map/fonts/label-latin.woff2',
  '/map/fonts/label-latin-ext.woff2',
  '/map/sprites/sprite.json',
  '/map/sprites/sprite.png',
  '/map/sprites/sprite@2x.json',
  '/map/sprites/sprite@2x.png',
];

export default defineConfig({
  plugins: [
    react(),
    tailwindcss(),
    VitePWA({
      // A new version waits until the surveyor chooses to reload (src/app/update-prompt.tsx); never forced mid-form.
      registerType: 'prompt',
      injectRegister: false,
      includeAssets: ['roostline.svg', 'icons/apple-touch-icon.png'],
      manifest: {
        id: '/',
        name: 'Roostline',
        short_name: 'Roostline',
        description: 'Perch-site surveys and line inventory for drones that recharge on live overhead conductors.',
        lang: 'en',
        start_url: '/',
        scope: '/',
        display: 'standalone',
        orientation: 'any',
        theme_color: '#12343b',
        background_color: '#f7f4ee',
        categories: ['productivity', 'utilities'],
        icons: [
          ...[48, 72, 96, 144, 192, 512].map((s) => ({ src: `/icons/icon-${s}.png`, sizes: `${s}x${s}`, type: 'image/png', purpose: 'any' })),
          { src: '/icons/maskable-192.png', sizes: '192x192', type: 'image/png', purpose: 'maskable' },
          { src: '/icons/maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
        ],
      },
      workbox: {
        // .mjs: the map library's worker, without which no map draws offline.
        globPatterns: ['**/*.{js,mjs,css,html,woff2,svg,png,webmanifest}'],
        // The map library's chunk is above Workbox's 2 MiB default.
        maximumFileSizeToCacheInBytes: 8 * 1024 * 1024,
        additionalManifestEntries: MAP_ASSETS.map((url) => ({ url, revision: BUILD_REVISION })),
        navigateFallback: '/index.html',
        navigateFallbackDenylist: [/^\/api\//, /^\/map\//],
        clientsClaim: true,
        skipWaiting: false,
        cleanupOutdatedCaches: true,
        runtimeCaching: [
          {
            // Basemap tiles (read out of the PMTiles file by the server): from the device first, refreshed behind.
            // An area taken offline stores its tiles here (src/features/offline-areas).
            urlPattern: ({ url }) => url.pathname.startsWith('/map/basemap/'),
            handler: 'StaleWhileRevalidate',
            options: { cacheName: CACHE_BASEMAP_TILES, cacheableResponse: { statuses: [200] } },
          },
          {
            // The map's zones and photo points: the network while there is one, the last copy without.
            urlPattern: ({ url }) => url.pathname === '/api/zones' || url.pathname === '/api/photos/geojson',
            handler: 'NetworkFirst',
            options: { cacheName: CACHE_MAP_DATA, networkTimeoutSeconds: 4, cacheableResponse: { statuses: [200] } },
          },
          {
            urlPattern: ({ url }) => url.pathname.startsWith('/api/tiles/spans/'),
            handler: 'NetworkFirst',
            options: { cacheName: CACHE_SPAN_TILES, networkTimeoutSeconds: 4, cacheableResponse: { statuses: [200] } },
          },
          {
            urlPattern: ({ url }) => /^\/api\/photos\/[^/]+\/[a-z]+$/.test(url.pathname),
            handler: 'CacheFirst',
            options: { cacheName: CACHE_PHOTOS, cacheableResponse: { statuses: [200] } },
          },
        ],
      },
      devOptions: { enabled: false },
    }),
  ],
  server: {
    port: 5173,
    // The API and the map assets come from the Express server in development.
    proxy: {
      '/api': { target: 'http://localhost:3000', changeOrigin: false },
      '/map': { target: 'http://localhost:3000', changeOrigin: false },
    },
  },
  build: { outDir: 'dist', sourcemap: false, chunkSizeWarningLimit: 1500 },
});
