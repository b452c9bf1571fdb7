// Builds the renderer (renderer/ -> renderer/dist). Relative asset paths so the same build
// loads from the loopback server and from file:// in the desktop window.
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';
import type { Plugin } from 'vite';
import react from '@vitejs/plugin-react';

// Same policy the loopback server sends; as a meta tag it also covers file:// in Electron.
// Added at build time only, because the dev server injects an inline refresh script.
const CSP =
  "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; connect-src 'self'; " +
  "object-src 'none'; base-uri 'none'; form-action 'none'";

const contentSecurityPolicy = (): Plugin => ({
  name: 'dipledger-csp',
  apply: 'build',
  transformIndexHtml: () => [
    {
      tag: 'meta',
      attrs: { 'http-equiv': 'Content-Security-Policy', content: CSP },
      injectTo: 'head-prepend',
    },
  ],
});

export default defineConfig({
  root: fileURLToPath(new URL('./renderer', import.meta.url)),
  base: './',
  plugins: [react(), contentSecurityPolicy()],
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    // The CSP forbids inline code, so never inline assets as data: URLs.
    assetsInlineLimit: 0,
    sourcemap: true,
    // One bundle (charts, virtual rows, CSV) loaded from disk or loopback, never over a network:
    // its size costs nothing worth splitting for, so the warning is set above it.
    chunkSizeWarningLimit: 1500,
  },
  server: {
    host: '127.0.0.1',
    // `vite` dev server: the API comes from a running `npm start` in browser mode. Open its printed
    // address (with the token) once first: the cookie it sets reaches this port too, since cookies
    // ignore ports. changeOrigin: the server answers only its own Host header; the Origin of this
    // page is dropped because the server refuses other origins.
    proxy: {
      '/api': {
        target: 'http://127.0.0.1:5317',
        changeOrigin: true,
        configure: (proxy) => proxy.on('proxyReq', (req) => req.removeHeader('origin')),
      },
    },
  },
});
