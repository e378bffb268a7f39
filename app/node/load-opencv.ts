/**
 * Loads opencv-wasm for Node (CLI, tests, Electron main). The module is large
 * (about 0.2 s to load), so it is loaded once, on first use.
 */
import { createRequire } from 'node:module';
import type { OpenCv } from '../../core/image/opencv-handle';

let cached: OpenCv | undefined;

export function loadOpenCv(): OpenCv {
  if (!cached) {
    const require = createRequire(import.meta.url);
    cached = (require('opencv-wasm') as { cv: OpenCv }).cv;
  }
  return cached;
}
