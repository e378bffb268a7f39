/**
 * The simulator against a second, independent implementation of its documented model:
 * numpy (Debian's python3-numpy) evaluates, from the truth file alone and the formulas in
 * core/simulate's headers, every term of the expected image at every one of the s x s
 * sub-pixel points, without tables: diffuse background, amorphous halo (exact q(R)),
 * direct beam, rolled-off pseudo-Voigt rings with their texture or grain spots, the beam
 * stop, gain and offset. The noise-free float32 image must match it pixel by pixel within
 * the tables' documented interpolation bounds.
 */
import { describe, expect, it } from 'vitest';
import { findPhase } from '../../core/crystal';
import { simulatePattern, type SimulationSpec } from '../../core/simulate';
import { referenceAvailable, runPythonJson } from './python-reference';

const MODEL = `
import numpy as np
T = INPUT["truth"]
w, h, s = T["image"]["widthPx"], T["image"]["heightPx"], T["image"]["supersampling"]
fr = T["frame"]; q = fr["axisRatio"]; a = np.radians(fr["angleDeg"])
off = (np.arange(s) + 0.5) / s - 0.5
ys, xs = np.mgrid[0:h, 0:w].astype(float)
X = xs[:, :, None, None] + off[None, None, :, None]
Y = ys[:, :, None, None] + off[None, None, None, :]
dx, dy = X - fr["centerXPx"], Y - fr["centerYPx"]
u = dx * np.cos(a) + dy * np.sin(a)
v = -dx * np.sin(a) + dy * np.cos(a)
R = np.sqrt(u * u / q + q * v * v)
phi = np.arctan2(v * np.sqrt(q), u / np.sqrt(q)) + a
lam, L = T["wavelengthA"], T["cameraLengthPx"]
I = np.zeros_like(R)
spot_bound = np.zeros_like(R)
bg = T["background"]
g = lambda r: (1 + (r / bg["scaleRadiusPx"]) ** 2) ** (-bg["exponent"] / 2)
I += bg["floorCounts"] + bg["levelCounts"] * g(R) / g(T["referenceRadiusPx"])
for halo in T["halos"]:
    qR = 2 * np.sin(np.arctan2(R, L) / 2) / lam
    I += halo["peakCounts"] * np.exp(-4 * np.log(2) * ((qR - 1 / halo["dA"]) / halo["fwhmPerA"]) ** 2)
db = T["directBeam"]
I += db["peakCounts"] * np.exp(-4 * np.log(2) * (R / db["fwhmPx"]) ** 2)
def pv(x, G, eta):
    z2 = 4 * x * x / G ** 2
    return eta * 2 / (np.pi * G) / (1 + z2) + (1 - eta) * 2 / G * np.sqrt(np.log(2) / np.pi) * np.exp(-np.log(2) * z2)
for ring in T["rings"]:
    G, eta = ring["fwhmPx"], ring["eta"]
    x = np.abs(R - ring["radiusPx"])
    shape = pv(x, G, eta) / pv(0.0, G, eta)
    taper = np.where(x <= 10 * G, 1.0, np.where(x >= 20 * G, 0.0, 0.5 * (1 + np.cos(np.pi * (x - 10 * G) / (10 * G)))))
    M = np.ones_like(R)
    phase = T["phases"][ring["phaseIndex"]]
    if ring["spots"] is not None:
        sig = phase["spotFwhmPx"] / (max(ring["radiusPx"], phase["spotFwhmPx"]) * 2 * np.sqrt(2 * np.log(2)))
        M = np.zeros_like(R)
        curvature = np.zeros_like(R)
        N = len(ring["spots"])
        for spot in ring["spots"]:
            d = phi - np.radians(spot["azimuthDeg"])
            d = d - 2 * np.pi * np.round(d / (2 * np.pi))
            for k in (-1, 0, 1):
                z2 = ((d + 2 * np.pi * k) / sig) ** 2
                M += spot["weight"] * np.exp(-0.5 * z2)
                curvature += spot["weight"] * np.exp(-0.5 * z2) * (z2 + 1) / sig ** 2
        norm = 2 * np.pi / (N * sig * np.sqrt(2 * np.pi))
        M *= norm
        # Linear interpolation at node step h = 2 pi / n (n as in simulate-pattern.ts) errs by at most
        # h^2 / 8 |M''|; sum of |terms of M''| bounds |M''| over the step (the Gaussian hardly changes in sigma / 16).
        n = min(1 << 21, max(2048, int(np.ceil(2 * np.pi / (sig / 16)))))
        spot_bound += ring["peakCounts"] * shape * taper * (2 * np.pi / n) ** 2 / 8 * norm * curvature
    elif phase["texture"] is not None:
        t = phase["texture"]
        M = 1 + t["amplitude"] * np.cos(2 * (phi - np.radians(t["azimuthDeg"])))
    I += ring["peakCounts"] * shape * taper * M
st = T["beamStop"]
bx, by = X - st["centerXPx"], Y - st["centerYPx"]
sa = np.radians(st["stemAngleDeg"])
along = bx * np.cos(sa) + by * np.sin(sa)
across = np.abs(-bx * np.sin(sa) + by * np.cos(sa))
covered = (bx * bx + by * by <= st["radiusPx"] ** 2) | ((along >= 0) & (across <= st["stemWidthPx"] / 2))
I = np.where(covered, I * st["transmission"], I)
spot_bound = np.where(covered, spot_bound * st["transmission"], spot_bound)
E = I.mean(axis=(2, 3))
det = T["detector"]
out = det["offsetAdu"] + det["gainAduPerElectron"] * E
bound = det["gainAduPerElectron"] * spot_bound.mean(axis=(2, 3))
print(json.dumps({"image": out.ravel().tolist(), "spotBound": bound.ravel().tolist()}))
`;

describe.runIf(referenceAvailable('numpy'))('simulatePattern against an independent numpy evaluation of its model', () => {
  it('a noise-free, distorted, off-centre Au + Si pattern with spots, texture, halo, direct beam and beam stop matches numpy pixel by pixel', () => {
    const spec: SimulationSpec = {
      widthPx: 180,
      heightPx: 150,
      voltageV: 120e3,
      cameraLengthPx: 6500,
      frame: { centerXPx: 84.3, centerYPx: 70.8, axisRatio: 1.025, angleDeg: 118 },
      phases: [
        { phase: findPhase('Au')!, grainsPerRing: 25, spotFwhmPx: 2.5 },
        { phase: findPhase('Si')!, weight: 0.5, latticeScale: 1.003, texture: { shape: 'cosine', amplitude: 0.5, azimuthDeg: -30 } },
      ],
      peakCounts: 2000,
      ringFwhmPx: 1.8,
      ringEta: 0.35,
      background: { levelCounts: 300, floorCounts: 20 },
      halos: [{ dA: 2.1, fwhmPerA: 0.12, peakCounts: 150 }],
      directBeam: { peakCounts: 5e5, fwhmPx: 5 },
      beamStop: { radiusPx: 9, stemAngleDeg: 250, stemWidthPx: 7, transmission: 0.01 },
      detector: { gainAduPerElectron: 1.7, offsetAdu: 40 },
      noise: false,
      output: 'float32',
      seed: 31,
    };
    const { raster, truth } = simulatePattern(spec);
    expect(truth.rings.some((r) => r.spots !== null)).toBe(true);
    expect(truth.rings.some((r) => r.phaseId === 'Si')).toBe(true);
    const ref = runPythonJson<{ image: number[]; spotBound: number[] }>(MODEL, { truth });
    expect(ref.image).toHaveLength(raster.data.length);
    // Allowed: 1e-3 of the value (the radial table's (h / FWHM)^2 <= 2.5e-4 of a ring's height, float32
    // rounding 6e-8) plus, on spotty rings, the spot table's linear-interpolation bound h^2 |S''| / 8
    // computed by numpy at each sub-pixel point.
    let worst = 0;
    let worstAt = -1;
    let spotLimited = 0;
    for (let i = 0; i < ref.image.length; i++) {
      const allowed = 1e-3 * ref.image[i]! + ref.spotBound[i]!;
      const ratio = Math.abs(raster.data[i]! - ref.image[i]!) / allowed;
      if (ref.spotBound[i]! > 1e-3 * ref.image[i]!) spotLimited++;
      if (ratio > worst) {
        worst = ratio;
        worstAt = i;
      }
    }
    console.log(
      `forward model: worst pixel uses ${(100 * worst).toFixed(1)}% of its allowance (pixel ${worstAt % 180}, ${Math.floor(worstAt / 180)}: ` +
        `${raster.data[worstAt]!.toFixed(3)} vs numpy ${ref.image[worstAt]!.toFixed(3)}); ${spotLimited} pixels where the spot bound dominates`,
    );
    expect(worst).toBeLessThan(1);
    // Most pixels are held to 1e-3 of their value.
    expect(spotLimited).toBeLessThan(0.05 * ref.image.length);
  });
});
