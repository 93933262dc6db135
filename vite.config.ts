/**
 * Build of the field app (pwa/) and the vitest settings.
 *
 * - Vite root is pwa/ (pwa/index.html loads /main.tsx and /sw-register.ts);
 *   the build goes to dist/ at the repository root.
 * - icons/ is the public folder: its PNGs (rendered from icons/shearfield.svg
 *   with rsvg-convert and committed) are copied to the root of dist/.
 * - vite-plugin-pwa in injectManifest mode builds our own service worker
 *   (pwa/sw/sw.ts) and writes the precache list from the build output into
 *   it, and writes the web app manifest.
 * - The compute worker is bundled as an ES module chunk of its own.
 * - The built index.html carries the app's Content-Security-Policy and
 *   referrer policy as meta tags (office/app-csp.ts).
 * - The tests' settings are in vitest.config.ts, which builds on this file.
 */
import { fileURLToPath } from 'node:url';
import preact from '@preact/preset-vite';
import { VitePWA } from 'vite-plugin-pwa';
import { defineConfig } from 'vite';
import { APP_CSP_META } from './office/app-csp.ts';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));

/** Brand colours (our own): deep green-teal and warm paper. */
const THEME_COLOR = '#123c3a';
const BACKGROUND_COLOR = '#f4efe2';

export default defineConfig({
  root: here('./pwa'),
  publicDir: here('./icons'),
  build: {
    outDir: here('./dist'),
    emptyOutDir: true,
    target: 'es2022',
    sourcemap: false,
  },
  worker: { format: 'es' },
  preview: { host: '127.0.0.1', port: 4173, strictPort: true },
  plugins: [
    preact(),
    // The app's security policy in the built page too, for static hosts (the office server also sends it as a header).
    {
      name: 'shearfield-security-meta',
      apply: 'build',
      transformIndexHtml: () => [
        { tag: 'meta', attrs: { 'http-equiv': 'Content-Security-Policy', content: APP_CSP_META }, injectTo: 'head-prepend' },
        { tag: 'meta', attrs: { name: 'referrer', content: 'no-referrer' }, injectTo: 'head-prepend' },
      ],
    },
    // The service worker and manifest are build products; vitest needs neither.
    process.env.VITEST
      ? null
      : VitePWA({
          strategies: 'injectManifest',
          srcDir: 'sw',
          filename: 'sw.ts',
          injectRegister: false, // pwa/sw-register.ts registers it (workbox-window)
          registerType: 'prompt',
          manifestFilename: 'manifest.webmanifest',
          includeAssets: [],
          manifest: {
            id: '/',
            name: 'Shearfield',
            short_name: 'Shearfield',
            description:
              'Offline field calculator for Love-wave dispersion picks: layer thickness with its uncertainty, site figures and survey advice.',
            lang: 'en',
            start_url: '/',
            scope: '/',
            display: 'standalone',
            orientation: 'any',
            theme_color: THEME_COLOR,
            background_color: BACKGROUND_COLOR,
            categories: ['utilities', 'productivity'],
            icons: [
              { src: '/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
              { src: '/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
              { src: '/icon-512-maskable.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
            ],
          },
          injectManifest: {
            // The manifest and its icons are added by the plugin itself.
            globPatterns: ['**/*.{js,css,html,svg,woff2}'],
            // The service worker is built with the app's mode; keep it small.
            minify: true,
          },
          devOptions: { enabled: false },
        }),
  ],
});
