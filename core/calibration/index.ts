/** Camera calibration on a standard film (or an internal standard), in the exact geometry. */
export * from './camera-length-fit';
export * from './standard-ring-assignment';
export * from './camera-calibration';
