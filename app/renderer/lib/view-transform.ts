/**
 * Zoom and pan of the image view: screen = offset + scale * image (pixel centres at
 * integer image coordinates, so pixel i spans [i - 0.5, i + 0.5)).
 */
export interface ViewTransform {
  scale: number;
  offsetX: number;
  offsetY: number;
}

export const MIN_SCALE = 0.05;
export const MAX_SCALE = 64;

/** The whole image centred in a viewport of w x h screen px. */
export function fitTransform(imageW: number, imageH: number, viewW: number, viewH: number): ViewTransform {
  const scale = Math.max(MIN_SCALE, Math.min(viewW / imageW, viewH / imageH));
  return { scale, offsetX: (viewW - imageW * scale) / 2 + scale * 0.5, offsetY: (viewH - imageH * scale) / 2 + scale * 0.5 };
}

export function toImage(t: ViewTransform, sx: number, sy: number): { x: number; y: number } {
  return { x: (sx - t.offsetX) / t.scale, y: (sy - t.offsetY) / t.scale };
}

export function toScreen(t: ViewTransform, x: number, y: number): { x: number; y: number } {
  return { x: t.offsetX + t.scale * x, y: t.offsetY + t.scale * y };
}

/** Zoom by `factor` keeping the image point under (sx, sy) where it is. */
export function zoomAt(t: ViewTransform, factor: number, sx: number, sy: number): ViewTransform {
  const scale = Math.min(MAX_SCALE, Math.max(MIN_SCALE, t.scale * factor));
  const k = scale / t.scale;
  return { scale, offsetX: sx - k * (sx - t.offsetX), offsetY: sy - k * (sy - t.offsetY) };
}

export function panBy(t: ViewTransform, dx: number, dy: number): ViewTransform {
  return { ...t, offsetX: t.offsetX + dx, offsetY: t.offsetY + dy };
}
