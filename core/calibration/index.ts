/** Camera calibration on a standard film (or an internal standard), in the exact geometry, and its uncertainty budget. */
export * from './camera-length-fit';
export * from './standard-ring-assignment';
export * from './camera-calibration';
export * from './standard-reference-uncertainty';
export * from './camera-uncertainty-budget';
export * from './fit-camera-on-standard';
export * from './strongest-measured-ring-check';
export * from './strongest-standard-ring-check';
