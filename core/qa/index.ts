/** Quality control: does a film match its expected phase and lattice constant? */
export * from './film-check';
