import {
  ELECTRON_MASS_KG,
  ELECTRON_REST_ENERGY_EV,
  ELEMENTARY_CHARGE_C,
  M_PER_ANGSTROM,
  PLANCK_J_S,
  SPEED_OF_LIGHT_M_PER_S,
} from './constants';

/** Kinematics of an electron accelerated from rest through a potential difference. */
export interface ElectronBeam {
  /** Accelerating voltage, V. */
  voltageV: number;
  /** Relativistic de Broglie wavelength, Å. */
  wavelengthA: number;
  /** Same wavelength in picometres. */
  wavelengthPm: number;
  /** Lorentz factor gamma = 1 + eV / (m_e c^2). */
  gamma: number;
  /** Speed as a fraction of c: beta = sqrt(1 - 1/gamma^2). */
  betaVOverC: number;
  /** Radius of the Ewald sphere, 1/lambda, in 1/Å. */
  ewaldRadiusPerA: number;
}

function checkVoltage(voltageV: number): void {
  if (!Number.isFinite(voltageV) || voltageV <= 0) {
    throw new RangeError(`voltageV must be a positive, finite number of volts; got ${voltageV}`);
  }
}

/**
 * Relativistic de Broglie wavelength of an electron accelerated through `voltageV`.
 *
 *   lambda = h / sqrt( 2 m_e e V (1 + e V / (2 m_e c^2)) )
 *
 * (de Broglie's p = h / lambda with the relativistic momentum
 * p c = sqrt(E_k^2 + 2 E_k m_e c^2), E_k = eV; e.g. D. B. Williams and
 * C. B. Carter, Transmission Electron Microscopy, 2nd ed., Springer 2009, eq. 1.6.)
 *
 * @param voltageV accelerating voltage in volts, > 0
 * @returns wavelength in Å
 * @example electronWavelengthA(200e3) // 0.025079...
 */
export function electronWavelengthA(voltageV: number): number {
  checkVoltage(voltageV);
  const kineticJ = ELEMENTARY_CHARGE_C * voltageV;
  const momentumSquared =
    2 * ELECTRON_MASS_KG * kineticJ * (1 + kineticJ / (2 * ELECTRON_MASS_KG * SPEED_OF_LIGHT_M_PER_S ** 2));
  return PLANCK_J_S / Math.sqrt(momentumSquared) / M_PER_ANGSTROM;
}

/**
 * Derivative d(lambda)/dV, Å per volt, from differentiating the formula above:
 *   dlambda/dV = -lambda/2 * (1 + eV/(m c^2)) / (V (1 + eV/(2 m c^2)))
 * Used to carry a high-tension uncertainty into the wavelength.
 */
export function electronWavelengthSlopeAPerV(voltageV: number): number {
  checkVoltage(voltageV);
  const x = voltageV / ELECTRON_REST_ENERGY_EV;
  return (-electronWavelengthA(voltageV) / 2) * ((1 + x) / (voltageV * (1 + x / 2)));
}

/**
 * All the beam quantities at once: wavelength, gamma, v/c and the Ewald-sphere radius.
 * gamma = 1 + eV / (m_e c^2); beta = sqrt(1 - 1/gamma^2).
 */
export function electronBeam(voltageV: number): ElectronBeam {
  const wavelengthA = electronWavelengthA(voltageV);
  const gamma = 1 + voltageV / ELECTRON_REST_ENERGY_EV;
  return {
    voltageV,
    wavelengthA,
    wavelengthPm: wavelengthA * 100,
    gamma,
    betaVOverC: Math.sqrt(1 - 1 / (gamma * gamma)),
    ewaldRadiusPerA: 1 / wavelengthA,
  };
}
