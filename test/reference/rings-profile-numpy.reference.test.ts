/**
 * The azimuthal integration against an independent numpy computation of the same
 * quantities (python3-numpy): same frame, mask and splitting definition, computed
 * there by broadcasting every sub-pixel at once and np.bincount, and the scatter by
 * np.polyfit bin by bin.
 */
import { describe, expect, it } from 'vitest';
import { integrateRadialProfile } from '../../core/rings/azimuthal-integration';
import { integrateAzimuthalTexture } from '../../core/rings/azimuthal-texture';
import { prepareIntegrationGeometry } from '../../core/rings/integration-geometry';
import { gaussian, mulberry32 } from '../support/seeded-random';
import { referenceAvailable, runPythonJson } from './python-reference';

const W = 48;
const H = 40;
const frame = { centerXPx: 23.4, centerYPx: 19.7, axisRatio: 1.03, angleDeg: 130 };

function testImage() {
  const rand = mulberry32(97);
  const data = new Float32Array(W * H);
  const excluded = new Uint8Array(W * H);
  for (let j = 0; j < H; j++) for (let i = 0; i < W; i++) {
    const r = Math.hypot(i - 23.4, j - 19.7);
    data[j * W + i] = 100 + 400 * Math.exp(-0.5 * ((r - 12.3) / 1.3) ** 2) + 10 * gaussian(rand);
    if (rand() < 0.1) excluded[j * W + i] = 1;
  }
  data[5 * W + 7] = Number.NaN;
  return { raster: { width: W, height: H, data }, mask: { width: W, height: H, excluded } };
}

const NUMPY_PROFILE = `
import numpy as np
W, H, n, s = INPUT["W"], INPUT["H"], INPUT["n"], INPUT["s"]
img = np.array([np.nan if v is None else v for v in INPUT["data"]], dtype=np.float64).reshape(H, W)
excl = np.array(INPUT["mask"], dtype=bool).reshape(H, W)
cx, cy, q, ang = INPUT["cx"], INPUT["cy"], INPUT["q"], np.deg2rad(INPUT["angleDeg"])
rmin, w = INPUT["rMin"], INPUT["w"]
sector = INPUT["sector"]
valid = ~excl & np.isfinite(img)
jj, ii = np.mgrid[0:H, 0:W]

def corrected(x, y):
    dx, dy = x - cx, y - cy
    u = dx * np.cos(ang) + dy * np.sin(ang)
    v = -dx * np.sin(ang) + dy * np.cos(ang)
    return np.sqrt(u * u / q + q * v * v), u, v

if sector is not None:
    _, u0, v0 = corrected(ii.astype(float), jj.astype(float))
    az = np.arctan2(v0 * np.sqrt(q), u0 / np.sqrt(q)) + ang
    az = np.where(az > np.pi, az - 2 * np.pi, az)
    az = np.where(az <= -np.pi, az + 2 * np.pi, az)
    valid &= np.mod(az - sector[0], 2 * np.pi) < sector[1]

off = (np.arange(s) + 0.5) / s - 0.5
X = ii[:, :, None, None] + off[None, None, None, :]
Y = jj[:, :, None, None] + off[None, None, :, None]
R, _, _ = corrected(X, Y)
k = np.floor((R - rmin) / w).astype(np.int64)
inb = (k >= 0) & (k < n) & valid[:, :, None, None]
vals = np.broadcast_to(img[:, :, None, None], R.shape)
area = np.bincount(k[inb], weights=np.full(int(inb.sum()), 1.0 / s**2), minlength=n)
sums = np.bincount(k[inb], weights=vals[inb] / s**2, minlength=n)
pix = np.broadcast_to((jj * W + ii)[:, :, None, None], R.shape)[inb].astype(np.int64)
keys, counts = np.unique(pix * n + k[inb], return_counts=True)
frac = counts / s**2
area2 = np.bincount(keys % n, weights=frac * frac, minlength=n)

# Scatter: whole pixels by centre radius, residual of a quadratic in (R0 - bin centre), over n - 3.
R0, _, _ = corrected(ii.astype(float), jj.astype(float))
kc = np.floor((R0 - rmin) / w).astype(np.int64)
okc = valid & (kc >= 0) & (kc < n)
var = np.full(n, np.nan)
for b in range(n):
    sel = okc & (kc == b)
    m = int(sel.sum())
    if m <= 6:
        continue
    x = R0[sel] - (rmin + (b + 0.5) * w)
    y = img[sel]
    coef = np.polyfit(x, y, 2)
    var[b] = np.sum((y - np.polyval(coef, x)) ** 2) / (m - 3)
with np.errstate(invalid="ignore", divide="ignore"):
    mean = sums / area
    stderr = np.sqrt(var / area)
print(json.dumps({"area": area.tolist(), "sum": sums.tolist(), "mean": [None if not np.isfinite(v) else v for v in mean],
                  "stdErr": [None if not np.isfinite(v) else v for v in stderr], "area2": area2.tolist(),
                  "pixels": np.bincount(kc[okc], minlength=n).tolist()}))
`;

const NUMPY_TEXTURE = `
import numpy as np
W, H, s, M = INPUT["W"], INPUT["H"], INPUT["s"], INPUT["M"]
img = np.array([np.nan if v is None else v for v in INPUT["data"]], dtype=np.float64).reshape(H, W)
excl = np.array(INPUT["mask"], dtype=bool).reshape(H, W)
cx, cy, q, ang = INPUT["cx"], INPUT["cy"], INPUT["q"], np.deg2rad(INPUT["angleDeg"])
valid = ~excl & np.isfinite(img)
jj, ii = np.mgrid[0:H, 0:W]
def rotate(x, y):
    dx, dy = x - cx, y - cy
    return dx * np.cos(ang) + dy * np.sin(ang), -dx * np.sin(ang) + dy * np.cos(ang)
u0, v0 = rotate(ii.astype(float), jj.astype(float))
az = np.arctan2(v0 * np.sqrt(q), u0 / np.sqrt(q)) + ang
az = np.where(az > np.pi, az - 2 * np.pi, az)
az = np.where(az <= -np.pi, az + 2 * np.pi, az)
cell = np.clip(np.floor((az + np.pi) * M / (2 * np.pi)).astype(np.int64), 0, M - 1)
off = (np.arange(s) + 0.5) / s - 0.5
u, v = rotate(ii[:, :, None, None] + off[None, None, None, :], jj[:, :, None, None] + off[None, None, :, None])
R = np.sqrt(u * u / q + q * v * v)
out = []
for lo, hi in INPUT["bands"]:
    frac = ((R >= lo) & (R < hi)).sum(axis=(2, 3)) / s**2
    frac = np.where(valid, frac, 0.0)
    area = np.bincount(cell.ravel(), weights=frac.ravel(), minlength=M)
    sums = np.bincount(cell.ravel(), weights=(frac * np.where(valid, img, 0.0)).ravel(), minlength=M)
    out.append({"area": area.tolist(), "sum": sums.tolist()})
print(json.dumps(out))
`;

describe.runIf(referenceAvailable('numpy'))('azimuthal integration against numpy', () => {
  const { raster, mask } = testImage();
  const geometry = prepareIntegrationGeometry(W, H, frame);
  const input = (extra: Record<string, unknown>) => ({
    W,
    H,
    data: Array.from(raster.data, (v) => (Number.isFinite(v) ? v : null)),
    mask: Array.from(mask.excluded),
    cx: frame.centerXPx,
    cy: frame.centerYPx,
    q: frame.axisRatio,
    angleDeg: frame.angleDeg,
    ...extra,
  });

  for (const [subdivision, sector] of [[3, null], [1, null], [2, { startRad: 1.0, widthRad: 2.5 }]] as const) {
    it(`gives the same area, sum, mean, split fractions and scatter standard error per bin (s = ${subdivision}${sector ? ', a sector' : ''})`, () => {
      const rMin = 2;
      const w = 0.5;
      const p = integrateRadialProfile(raster, mask, geometry, { rMinPx: rMin, rMaxPx: 30, binWidthPx: w, subdivision, sector: sector ?? undefined });
      const n = p.mean.length;
      const ref = runPythonJson<{ area: number[]; sum: number[]; mean: (number | null)[]; stdErr: (number | null)[]; area2: number[]; pixels: number[] }>(
        NUMPY_PROFILE,
        input({ n, s: subdivision, rMin, w, sector: sector ? [sector.startRad, sector.widthRad] : null }),
      );
      let compared = 0;
      for (let k = 0; k < n; k++) {
        expect(p.area[k]).toBeCloseTo(ref.area[k]!, 10);
        expect(Math.abs(p.sum[k]! - ref.sum[k]!)).toBeLessThan(1e-9 * Math.max(1, Math.abs(ref.sum[k]!)));
        if (ref.mean[k] === null) expect(Number.isNaN(p.mean[k]!)).toBe(true);
        else expect(Math.abs(p.mean[k]! - ref.mean[k]!)).toBeLessThan(1e-9 * Math.abs(ref.mean[k]!));
        if (p.area[k]! > 0) expect(p.effectiveCount![k]).toBeCloseTo((ref.area[k]! * ref.area[k]!) / ref.area2[k]!, 8);
        // The quadratic detrend is what numpy's polyfit does whenever a bin holds more than 6 pixels.
        if (ref.pixels[k]! > 6 && ref.stdErr[k] !== null) {
          expect(Math.abs(p.stdErr[k]! / ref.stdErr[k]! - 1)).toBeLessThan(1e-6);
          compared++;
        }
      }
      expect(compared).toBeGreaterThan(n / 2);
    });
  }

  it('gives the same (band x azimuth) cell areas and sums', () => {
    const bands = [{ innerRadiusPx: 8.2, outerRadiusPx: 11.7 }, { innerRadiusPx: 15, outerRadiusPx: 19.5 }];
    const t = integrateAzimuthalTexture(raster, mask, geometry, { bands, azimuthBinCount: 12, subdivision: 3 });
    const ref = runPythonJson<{ area: number[]; sum: number[] }[]>(NUMPY_TEXTURE, input({ s: 3, M: 12, bands: bands.map((b) => [b.innerRadiusPx, b.outerRadiusPx]) }));
    ref.forEach((band, b) => {
      for (let m = 0; m < 12; m++) {
        expect(t.area[b * 12 + m]).toBeCloseTo(band.area[m]!, 10);
        expect(Math.abs(t.sum[b * 12 + m]! - band.sum[m]!)).toBeLessThan(1e-8 * Math.max(1, Math.abs(band.sum[m]!)));
      }
    });
  });
});
