import { defineConfig } from 'vitest/config'
import vue from '@vitejs/plugin-vue'
import vuetify from 'vite-plugin-vuetify'

const apiPort = process.env.PORT ?? '8080'

export default defineConfig({
  plugins: [vue(), vuetify({ autoImport: true })],
  resolve: {
    alias: {
      '@shared': new URL('./shared', import.meta.url).pathname,
      // plotly's partial bundle with the SVG scatter trace only (1.2 MB instead of 5 MB): every plot
      // here is SVG scatter — the sample points are drawn by point-raster.ts — and this bundle holds
      // no new Function, which our Content-Security-Policy (no unsafe-eval) forbids. Same API. The full
      // bundle is a devDependency only for the TypeScript types it ships (the basic bundle has none);
      // this alias keeps it out of every build.
      'plotly.js-dist-min': 'plotly.js-basic-dist-min',
    },
  },
  build: { chunkSizeWarningLimit: 1500, sourcemap: false },
  server: {
    host: '127.0.0.1',
    proxy: { '/api': { target: `http://127.0.0.1:${apiPort}`, changeOrigin: false } },
  },
  test: {
    projects: [
      {
        test: { name: 'science', environment: 'node', include: ['tests/unit/shared/**/*.test.ts'] },
      },
      {
        plugins: [vue(), vuetify({ autoImport: true })],
        test: {
          name: 'unit', environment: 'happy-dom', include: ['tests/unit/src/**/*.test.ts'],
          server: { deps: { inline: ['vuetify'] } },
        },
      },
      {
        test: {
          name: 'api', environment: 'node', include: ['tests/api/**/*.test.ts'],
          testTimeout: 60_000, hookTimeout: 120_000, fileParallelism: false,
        },
      },
      {
        // start-up and the embedded database as a newcomer meets them (fresh clone, private folder, ports)
        test: {
          name: 'system', environment: 'node', include: ['tests/system/**/*.test.ts'],
          testTimeout: 240_000, hookTimeout: 60_000, fileParallelism: false,
        },
      },
      {
        test: {
          name: 'e2e', environment: 'node', include: ['tests/e2e/**/*.test.ts'],
          globalSetup: ['tests/e2e/global-setup.ts'], setupFiles: ['tests/e2e/page-errors.ts'],
          testTimeout: 120_000, hookTimeout: 180_000, fileParallelism: false,
        },
      },
    ],
  },
})
