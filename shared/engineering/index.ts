// Engineering methods of Roostline: pure functions, SI units in and out.
export * from './ampere.ts';
export * from './ct-harvester.ts';
export * from './ieee738.ts';
export * from './conductors.ts';
export * from './sag.ts';
export * from './geodesic.ts';
export * from './clearance.ts';
export * from './charge-time.ts';
export * from './bench-test.ts';
export * from './assessment.ts';
export * from './demo-profiles.ts';
export * from './wind-triangle.ts';
export * from './mission-energy.ts';
export * from './mission-leg.ts';
