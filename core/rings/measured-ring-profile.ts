/** One ring as measured from the radial profile (and, for quality, along its circumference). */
export interface RingMeasurement {
  /** Corrected radius of the peak (geometric mean of the semi-axes), px. */
  radiusPx: number;
  /** Standard uncertainty of radiusPx from the fit covariance, px. */
  radiusSigmaPx: number;
  /** Full width at half maximum of the fitted peak, px. */
  fwhmPx: number;
  /** Integrated intensity above the background in the profile, counts per pixel times px. */
  intensity: number;
  /** Peak height over the local noise of the profile. */
  snr: number;
  /** Fraction (0-1) of the circumference where the ring is seen above the background. */
  continuity: number;
  /** 0 for a smooth ring; larger for spotty rings of coarse grains (documented where computed). */
  spottiness: number;
  /** Relative amplitude of the azimuthal intensity variation (texture), 0 for uniform. */
  textureAmplitude: number;
  /** pseudo-Voigt mixing of the fitted peak (0 Gaussian, 1 Lorentzian), when fitted. */
  eta?: number;
  /** sqrt(C_RR) of the absolute covariance alone, before any widening by the reduced chi-square, px. */
  radiusSigmaAbsolutePx?: number;
  /** Reduced chi-square of the fit that gave the radius. */
  reducedChiSquare?: number;
  /** Azimuth of the texture maximum, degrees from +x toward +y in [0, 180); NaN when not measured. */
  textureAngleDeg?: number;
  /** Fraction (0-1) of the circumference that was measured (unmasked and inside the image). */
  visibleFraction?: number;
  /** Photon-counting (Cramer-Rao) limit on radiusSigmaPx for this ring, px; NaN when the counts scale is unknown. */
  radiusBoundPx?: number;
  /** How the fit was made when it needed a note (eta fixed, ...), or why a quality figure is missing. */
  note?: string;
}
