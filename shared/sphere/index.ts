/** Sphere geometry, quadrature and spherical harmonics used by the sky and landscape modules. */
export * from './directions';
export { gaussLegendre, gaussLegendreOn } from './gauss-legendre';
export { clampedCosineCoefficient, clampedCosineCoefficients } from './clamped-cosine-ramamoorthi-hanrahan-2001';
export { shCount, shIndex, normalizedLegendre, realShBasis, evaluateSh, evaluateShOnTiltAzimuthGrid } from './spherical-harmonics';
export { sphereGrid, projectGridOnSh, type SphereGrid } from './sphere-grid';
export { skyDomeIrradianceOnPlane } from './plane-quadrature';
export { capAverageMultipliers, capAveragedClampedCosineTable, lookupCapTable } from './cap-average';
export { shBasisOrder2, order2IrradianceForm, type Order2IrradianceForm } from './sh-order2-ramamoorthi-hanrahan-2001';
