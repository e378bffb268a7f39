// Builds the workspace (app/renderer, Svelte 5) into out/renderer, served by
// `annula serve` and loaded by the desktop app. Relative asset paths (base './') so
// the same build works on http://127.0.0.1:<port>/ and on annula://workspace/.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { svelte } from '@sveltejs/vite-plugin-svelte';
import { defineConfig, type Plugin } from 'vite';

/**
 * OpenCV's browser build (opencv-wasm/opencv-deno.js with its wasm in opencv-bin.js) is
 * copied as it is to assets/opencv/ and imported by URL in the worker: bundling its
 * 9 MB UMD wrapper split it into chunks that import each other and never finished
 * loading in the worker.
 */
function copyOpenCv(): Plugin {
  const require = createRequire(import.meta.url);
  const dir = require.resolve('opencv-wasm/opencv-deno.js').replace(/opencv-deno\.js$/, '');
  return {
    name: 'annula-copy-opencv',
    apply: 'build',
    generateBundle() {
      for (const file of ['opencv-deno.js', 'opencv-bin.js']) {
        this.emitFile({ type: 'asset', fileName: `assets/opencv/${file}`, source: readFileSync(dir + file) });
      }
    },
  };
}

export default defineConfig({
  root: 'app/renderer',
  base: './',
  plugins: [svelte(), copyOpenCv()],
  build: {
    outDir: '../../out/renderer',
    emptyOutDir: true,
    target: 'es2022',
    chunkSizeWarningLimit: 12_000,
    // No inline <script> or style: the Content-Security-Policy allows only files from this origin.
    assetsInlineLimit: 0,
    modulePreload: { polyfill: false },
  },
  worker: { format: 'es', plugins: () => [copyOpenCv()] },
});
