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

/**
 * Zod 4 probes `new Function` once to speed up parsing. Our CSP allows no eval, so the probe
 * is reported as a violation (zod then parses without it); islands run zod jitless from the
 * start instead. Runs as a module before any island hydrates.
 */
const zodWithoutEval = {
  name: 'quayside-zod-without-eval',
  hooks: {
    /** @param {{ injectScript: (stage: 'before-hydration', content: string) => void }} options */
    'astro:config:setup': ({ injectScript }) =>
      injectScript(
        'before-hydration',
        'globalThis.__zod_globalConfig = Object.assign(globalThis.__zod_globalConfig ?? {}, { jitless: true });',
      ),
  },
};

export default defineConfig({
  output: 'server',
  // A separate build folder lets two checkouts' test runs build side by side.
  outDir: process.env.QUAYSIDE_BUILD_DIR ?? './dist',
  adapter: node({ mode: 'standalone' }),
  integrations: [react(), zodWithoutEval],
  security: { checkOrigin: true, allowedDomains: trustedHosts.map((hostname) => ({ hostname })) },
  // Astro hashes the inline scripts and styles it writes into each page (island hydration)
  // and sends them as the page's CSP script-src / style-src header; src/middleware.ts adds
  // the other directives (src/lib/server/security-headers.ts).
  experimental: { csp: true },
  vite: {
    plugins: [tailwindcss(), (await import('./scripts/vite-node-worker.mjs')).nodeWorkerPlugin()],
    resolve: { alias: { '@': new URL('./src', import.meta.url).pathname } },
  },
});
