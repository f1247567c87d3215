/** Pure coolant-chemistry computations shared by the server and the Angular client (no I/O, no Node APIs). */
export * from './validate';
export * from './monotone-interpolation';
export * from './water-saturation';
export * from './glycol';
export * from './boiling-point';
export * from './additive';
export * from './mix-correction';
export * from './make-up-water';
export * from './cautions';
export * from './chemistry';
export * from './top-up';
