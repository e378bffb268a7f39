/**
 * Crystallography: unit cells, Miller indices, symmetry operations and space groups,
 * electron scattering factors, structure factors, reflection families and the
 * predicted rings of a polycrystal. This file is the module's only public door.
 */
export * from './unit-cell';
export * from './hkl';
export * from './phase';
export * from './predicted-ring';
export * from './symmetry-operation';
export * from './space-group';
export * from './elements';
export * from './electron-scattering-factor';
export * from './structure-factor';
export * from './reflection-families';
export * from './predicted-rings';
export * from './phase-input-error';
export * from './cif-tokenizer';
export * from './cell-constraints';
export * from './displacement-parameters';
export * from './phase-description';
export * from './cif-phase';
export * from './phase-library';
