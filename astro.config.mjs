// @ts-check
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'astro/config';

/**
 * Hosts whose Host header the server trusts (Astro needs them to build the
 * request URL that its same-origin check compares against). Loopback names
 * match on any port, so the built server works on whatever PORT it is given;
 * HOST and PUBLIC_ORIGIN add the deployment's own name.
 */
function allowedDomains() {
  const names = new Set(['localhost', '127.0.0.1']);
  const host = process.env.HOST?.trim();
  if (host && host !== '0.0.0.0' && host !== '::') names.add(host);
  /** @type {{ hostname: string, protocol?: string, port?: string }[]} */
  const out = [...names].map((hostname) => ({ hostname }));
  const origin = process.env.PUBLIC_ORIGIN?.trim();
  if (origin) {
    const u = new URL(origin);
    out.push({ hostname: u.hostname, protocol: u.protocol.replace(':', ''), ...(u.port && { port: u.port }) });
  }
  return out;
}

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  server: { port: Number(process.env.PORT ?? 4321), host: process.env.HOST ?? 'localhost' },
  security: { checkOrigin: true, allowedDomains: allowedDomains() },
  devToolbar: { enabled: false },
  vite: {
    plugins: [tailwindcss()],
    worker: { format: 'es' },
  },
});
