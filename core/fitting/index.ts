/** Numerical fitting shared by the ring-geometry and peak fits. */
export * from './levenberg-marquardt';
