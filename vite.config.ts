import { defineConfig } from 'vite';
import preact from '@preact/preset-vite';
import { VitePWA } from 'vite-plugin-pwa';

export default defineConfig({
  plugins: [
    preact(),
    VitePWA({
      // Workbox writes sw.js with a precache of the whole build; src/ui/bridges/sw-bridge.ts
      // registers it with workbox-window and asks before a new version takes over.
      strategies: 'generateSW',
      registerType: 'prompt',
      injectRegister: false,
      // public/manifest.webmanifest is the manifest, copied as it is.
      manifest: false,
      workbox: {
        globPatterns: ['**/*.{js,css,html,webmanifest,png,svg}'],
        navigateFallback: 'index.html',
        cleanupOutdatedCaches: true,
        // The first worker controls the page at once, so the first visit already works offline.
        clientsClaim: true,
        // A new version waits until the user says so (the prompt); never under an open job.
        skipWaiting: false,
        sourcemap: false,
      },
      devOptions: { enabled: false },
    }),
  ],
  worker: { format: 'es' },
  build: {
    target: 'es2022',
    // Maps let a stack trace from a technician's phone be read against the source.
    sourcemap: true,
  },
  preview: {
    host: '127.0.0.1',
    port: 4173,
    strictPort: true,
  },
});
