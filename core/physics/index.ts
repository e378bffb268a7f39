/** Electron optics: beam wavelength, exact flat-detector geometry, camera-scale conversions, uncertainty of d. */
export * from './constants';
export * from './electron-wavelength';
export * from './detector-geometry';
export * from './camera-conversions';
export * from './d-spacing-uncertainty';
