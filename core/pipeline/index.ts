/** The pipeline: one image to rings, d-spacings and candidates, with every stage callable alone. */
export * from './analysis-settings';
export * from './analysis-result';
export * from './pattern-mask';
export * from './ring-d-spacings';
export * from './analyze';
export * from './index-ring-radii';
export * from './reindex-analysis';
