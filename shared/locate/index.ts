/**
 * Fault location from every kind of reading, fused into one best location.
 * Pure TypeScript: used by the server, the client and `npm run locate`.
 */
export * from './errors';
export * from './estimate';
export * from './conductors';
export * from './tdr';
export * from './bridge';
export * from './capacitance';
export * from './loop-resistance';
export * from './fuse';
