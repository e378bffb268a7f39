/**
 * The OpenCV module (opencv-wasm) as core sees it. core never loads it: a
 * surface loads the build that suits its platform (Node: require('opencv-wasm').cv;
 * a Web Worker: opencv-wasm/opencv-deno.js) and passes it in, so core stays
 * free of platform APIs.
 */
import type { cv as OpenCvModule } from 'opencv-wasm';

export type OpenCv = typeof OpenCvModule;
