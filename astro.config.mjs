// @ts-check
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'astro/config';

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  security: { checkOrigin: true },
  vite: {
    plugins: [tailwindcss()],
    resolve: { alias: { '@': new URL('./src', import.meta.url).pathname } },
  },
});
