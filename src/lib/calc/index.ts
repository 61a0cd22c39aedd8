/** The trade computations, pure and shared by client and server. */
export * from './angle';
export * from './units';
export * from './tire-size';
export * from './load-speed';
export * from './dot-code';
export * from './pressure';
export * from './torque';
export * from './bolt-circle';
export * from './balance';
export * from './uniformity';
export * from './pacing';
export * from './repair';
