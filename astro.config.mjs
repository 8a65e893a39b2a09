// @ts-check
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'astro/config';

// Host names the server may trust from the Host header (Astro builds request URLs and its
// same-origin check from them). Extra names for a deployment: QUAYSIDE_HOSTS=a.example,b.example
// at build time.
const trustedHosts = ['localhost', '127.0.0.1', ...(process.env.QUAYSIDE_HOSTS ?? '').split(',')]
  .map((h) => h.trim())
  .filter(Boolean);

export default defineConfig({
  output: 'server',
  // A separate build folder lets two checkouts' test runs build side by side.
  outDir: process.env.QUAYSIDE_BUILD_DIR ?? './dist',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  security: { checkOrigin: true, allowedDomains: trustedHosts.map((hostname) => ({ hostname })) },
  vite: {
    plugins: [tailwindcss(), (await import('./scripts/vite-node-worker.mjs')).nodeWorkerPlugin()],
    resolve: { alias: { '@': new URL('./src', import.meta.url).pathname } },
  },
});
