/**
 * Vector overlays over the image, drawn in screen space so lines stay one pixel wide at
 * any zoom: the centre, each fitted ring as the concentric-model ellipse (semi-axes
 * R sqrt(q) and R / sqrt(q), major axis at the fitted angle) with its hkl, and the
 * predicted rings of the chosen phase (dashed).
 */
import type { AnalysisResult } from '../../../core/pipeline';
import type { PredictedRadius } from './predicted-radii';
import { toScreen, type ViewTransform } from './view-transform';
import type { Overlays } from './workspace.svelte';

/** Miller indices as crystallographers write them: "220" when every index is one digit, else "2 2 10". */
export function hklText(hkl: readonly number[]): string {
  return hkl.every((h) => Math.abs(h) < 10 && h >= 0) ? hkl.join('') : hkl.join(' ');
}

export function drawOverlays(ctx: CanvasRenderingContext2D, t: ViewTransform, r: AnalysisResult, overlays: Overlays, predicted: readonly PredictedRadius[], hovered: number | null, style: CSSStyleDeclaration): void {
  if (!Number.isFinite(r.center.xPx)) return;
  const c = toScreen(t, r.center.xPx, r.center.yPx);
  const q = r.distortion.axisRatio;
  const angle = (r.distortion.angleDeg * Math.PI) / 180;
  const ringColour = style.getPropertyValue('--ring').trim() || '#4fc3d9';
  const hoverColour = style.getPropertyValue('--ring-hover').trim() || '#ffe066';
  const predictedColour = style.getPropertyValue('--predicted').trim() || '#d98cf2';
  const centreColour = style.getPropertyValue('--centre').trim() || '#ff6f61';
  const ellipse = (radiusPx: number): void => {
    ctx.beginPath();
    ctx.ellipse(c.x, c.y, radiusPx * Math.sqrt(q) * t.scale, (radiusPx / Math.sqrt(q)) * t.scale, angle, 0, 2 * Math.PI);
    ctx.stroke();
  };
  ctx.font = '12px system-ui, sans-serif';
  ctx.textBaseline = 'middle';

  if (overlays.predicted) {
    ctx.setLineDash([6, 5]);
    ctx.strokeStyle = predictedColour;
    ctx.lineWidth = 1;
    for (const p of predicted) ellipse(p.radiusPx);
    ctx.setLineDash([]);
  }
  if (overlays.rings) {
    r.rings.forEach((ring, i) => {
      const hot = i === hovered;
      ctx.strokeStyle = hot ? hoverColour : ringColour;
      ctx.lineWidth = hot ? 2.5 : 1.5;
      ellipse(ring.radiusPx);
      if (overlays.labels) {
        // Labels on the ellipse up and to the right of the centre, at three staggered
        // azimuths so neighbouring rings' labels do not cover each other.
        const phi = (-(25 + 20 * (i % 3)) * Math.PI) / 180;
        const u = ring.radiusPx * Math.sqrt(q) * Math.cos(phi - angle);
        const v = (ring.radiusPx / Math.sqrt(q)) * Math.sin(phi - angle);
        const x = c.x + t.scale * (u * Math.cos(angle) - v * Math.sin(angle));
        const y = c.y + t.scale * (u * Math.sin(angle) + v * Math.cos(angle));
        const text = ring.hkl ? hklText(ring.hkl) : `#${i + 1}`;
        const w = ctx.measureText(text).width + 8;
        ctx.fillStyle = 'rgba(8, 10, 14, 0.78)';
        ctx.fillRect(x + 4, y - 9, w, 18);
        ctx.fillStyle = hot ? hoverColour : '#e8eef3';
        ctx.fillText(text, x + 8, y);
      }
    });
  }
  if (overlays.centre) {
    ctx.strokeStyle = centreColour;
    ctx.lineWidth = 2;
    ctx.beginPath();
    ctx.moveTo(c.x - 10, c.y);
    ctx.lineTo(c.x + 10, c.y);
    ctx.moveTo(c.x, c.y - 10);
    ctx.lineTo(c.x, c.y + 10);
    ctx.stroke();
    ctx.beginPath();
    ctx.arc(c.x, c.y, 6, 0, 2 * Math.PI);
    ctx.stroke();
  }
}
