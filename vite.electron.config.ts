// Builds the desktop app's main process (out/electron/main.js, an ES module that
// imports its npm dependencies from node_modules) and, with --mode preload, the preload
// (out/electron/preload.cjs: sandboxed preloads must be one CommonJS file).
import { builtinModules } from 'node:module';
import { defineConfig } from 'vite';

export default defineConfig(({ mode }) => {
  const preload = mode === 'preload';
  return {
    build: {
      ssr: true,
      outDir: 'out/electron',
      emptyOutDir: false,
      target: 'node20',
      minify: false,
      sourcemap: true,
      rollupOptions: {
        input: preload ? 'app/electron/preload.ts' : 'app/electron/main.ts',
        external: ['electron', ...builtinModules, ...builtinModules.map((m) => `node:${m}`)],
        output: preload ? { format: 'cjs', entryFileNames: 'preload.cjs' } : { format: 'es', entryFileNames: 'main.js' },
      },
    },
    ssr: preload ? { noExternal: true } : {},
  };
});
