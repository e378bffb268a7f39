/**
 * The pixel passes a RowBandRunner may run on bands of rows (see row-bands.ts),
 * by name. A worker thread imports this table, and nothing else, to run a pass:
 * every entry takes plain data and returns plain data.
 */
import { accumulateRadialRowsPass } from './azimuthal-integration';
import { accumulateTextureRowsPass } from './azimuthal-texture';
import { hotPixelCandidateRowsPass } from './mask-hot-pixels';

export const ROW_BAND_PASSES = {
  /** Radial-profile sums (azimuthal-integration.ts): params { geometry, binning }. */
  radialProfile: accumulateRadialRowsPass,
  /** Texture cell sums (azimuthal-texture.ts): params a TextureCellPlan. */
  azimuthalTexture: accumulateTextureRowsPass,
  /** First-pass hot-pixel candidates (mask-hot-pixels.ts): params a HotPixelTest; the lists concatenate in band order. */
  hotPixelCandidates: hotPixelCandidateRowsPass,
};

export type RowBandPasses = typeof ROW_BAND_PASSES;
