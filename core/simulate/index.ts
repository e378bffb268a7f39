/**
 * The simulator: a forward model of a polycrystalline ring pattern (exact geometry,
 * elliptical distortion, kinematic ring intensities, pseudo-Voigt rings, diffuse
 * background, amorphous halos, direct beam, beam stop, texture, spotty rings, hot
 * pixels, Poisson and read noise, 16-bit output) with its exact truth. It makes the test
 * images of every later stage, the accuracy benchmark's cases and the demo samples.
 * This file is the module's only public door.
 */
export * from './simulation-spec';
export * from './simulation-truth';
export * from './simulate-pattern';
export * from './resolve-simulation-spec';
export * from './simulation-description';
export * from './seeded-random';
export * from './poisson-deviate';
export * from './ring-line-shape';
export * from './diffuse-background';
export * from './amorphous-halo';
export * from './direct-beam';
export * from './beam-stop';
export * from './texture-modulation';
export * from './grain-spots';
export * from './azimuth-table';
export * from './radial-table';
export * from './simulated-rings';
export * from './detector-response';
export * from './hot-pixels';
