/**
 * The pixel passes a RowBandRunner may run on bands of rows (see row-bands.ts),
 * by name. A worker thread imports this table, and nothing else, to run a pass:
 * every entry takes plain data and returns plain data.
 */
import { accumulateRadialRowsPass } from './azimuthal-integration';
import { accumulateTextureRowsPass } from './azimuthal-texture';
import { centerBlockRowsPass } from './center-estimate';
import { hotPixelCandidateRowsPass } from './mask-hot-pixels';
import { ringCandidateRowsPass } from './ring-candidates';
import { accumulateRingPointRowsPass } from './ring-points';

export const ROW_BAND_PASSES = {
  /** Radial-profile sums (azimuthal-integration.ts): params { geometry, binning }. */
  radialProfile: accumulateRadialRowsPass,
  /** Texture cell sums (azimuthal-texture.ts): params a TextureCellPlan. */
  azimuthalTexture: accumulateTextureRowsPass,
  /** First-pass hot-pixel candidates (mask-hot-pixels.ts): params a HotPixelTest; the lists concatenate in band order. */
  hotPixelCandidates: hotPixelCandidateRowsPass,
  /** Ring-point cell sums (ring-points.ts): params a RingPointPlan; the sums add up over bands. */
  ringPointSums: accumulateRingPointRowsPass,
  /** Block sums of the centre estimate's working image (center-estimate.ts): params a CenterBlockPlan; bands of whole block rows, concatenated. */
  centerBlockSums: centerBlockRowsPass,
  /** Quick-profile sums of the ring search (ring-candidates.ts): params a RingCandidatePlan; the sums add up over bands. */
  ringCandidateSums: ringCandidateRowsPass,
};

export type RowBandPasses = typeof ROW_BAND_PASSES;
