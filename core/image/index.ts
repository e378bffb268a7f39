/** Camera images into Annula's one-channel float raster: TIFF, PNG and JPEG decoding with size guards. */
export * from './raster';
export * from './decode-image';
export * from './image-decode-error';
export * from './image-decode-options';
export { DEFAULT_MAX_PIXELS } from './image-size-limit';
export { LUMINANCE_WEIGHTS_BT709 } from './luminance';
export type { ImageFormat } from './sniff-image-format';
export * from './encode-tiff';
