/** Ring indexing: cubic lattices with a figure of merit, equivalent answers, phase matching. */
export * from './measured-ring';
export * from './cubic-structure';
export * from './cubic-ring-ladder';
export * from './figure-of-merit';
export * from './proportional-q-fit';
export * from './ring-pattern-evidence';
export * from './ambiguity';
export * from './cubic-indexing';
export * from './phase-matching';
export * from './index-rings';
export * from './indexing-conclusion';
