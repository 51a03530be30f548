/**
 * Goodness of fit: type-7 quantiles, envelopes and the Mahalanobis-distance test. See METHODS.md section 5.
 */
export { quantileSorted, quantiles, sortedCopy } from './quantiles';
export { envelope, componentsOutside, DEFAULT_COVERAGES, type Envelope, type EnvelopeBand } from './envelope';
export {
  mahalanobisTest,
  meanAndCovariance,
  pseudoInverseSymmetric,
  sampleMatrix,
  symmetricEigen,
  DEFAULT_EIGEN_TOLERANCE,
  type MahalanobisResult,
  type MahalanobisOptions,
  type OutOfSupport,
  type SampleMatrix,
} from './mahalanobis';
