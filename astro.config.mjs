// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwind from '@astrojs/tailwind';

// Hosts whose Origin the server trusts for form posts. Loopback is always allowed so the
// local stack and the tests work; production adds its own names through PUBLIC_HOSTS.
const extraHosts = (process.env.PUBLIC_HOSTS ?? '')
  .split(',')
  .map((h) => h.trim())
  .filter(Boolean)
  .map((hostname) => ({ protocol: 'https', hostname }));

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react(), tailwind({ applyBaseStyles: false })],
  server: { host: '127.0.0.1', port: 4321 },
  security: {
    checkOrigin: true,
    allowedDomains: [
      { protocol: 'http', hostname: '127.0.0.1' },
      { protocol: 'http', hostname: 'localhost' },
      ...extraHosts,
    ],
  },
  devToolbar: { enabled: false },
  // Hashes of Astro's inline scripts and styles go into each page's CSP meta tag.
  experimental: { csp: true },
  vite: {
    ssr: { external: ['mysql2', 'knex', 'pdfkit', 'nodemailer', 'stripe'] },
  },
});
