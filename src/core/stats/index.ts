/**
 * Separability statistics and their p-values, over plain numbers and Float64Arrays (row-major), so
 * they do not depend on how the moments or the discriminant solution are stored.
 *
 *  - `wilks`, `pillai`, `hotellingLawley`, `roy`: tests of equal class means from the eigenvalues of
 *    S_W⁻¹ S_B (R's summary.manova approximations); `multivariateTestIssue` says when they are undefined.
 *  - `bartlettSequential`: how many discriminants carry separation.
 *  - `boxM`: equal class covariance matrices (or the reason it was skipped).
 *  - `univariateAnova`: per-feature F, p and η² from class moments.
 *  - `centroidMahalanobis`: distances between class centroids under a covariance.
 *  - `fUpperTail`, `chiSquareUpperTail`: tail probabilities accurate deep into the tail.
 */
export { chiSquareUpperTail, fUpperTail } from './distributions';
export { hotellingLawley, multivariateTestIssue, pillai, roy, wilks, type MultivariateTest } from './multivariate';
export { bartlettSequential, type SequentialTest } from './bartlett';
export { boxM, type BoxMClass, type BoxMResult, type BoxMSkipped } from './boxM';
export { univariateAnova, type UnivariateTest } from './anova';
export { centroidMahalanobis, centroidMahalanobisWhitened } from './distances';
