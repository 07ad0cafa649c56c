/**
 * num/: generic maths without control words. One concept per file; this list is the public surface.
 * Owners append their own lines.
 */
export { luFactor, luSolve, solve, determinant, matMul, matVec, identity, transpose, normInf, householderQ, solveComplexInPlace, solveHessenbergComplexInPlace } from './linalg.js';
export { eigenvalues, eigenvector, balance, hessenberg, hessenbergEigenvalues } from './eig.js';
export type { Eigenvalues } from './eig.js';
export { polyTrim, polyEval, polyEvalComplex, polyMul, polyAdd, polyFromRoots, polyRoots } from './poly.js';
export { nelderMead, nelderMeadSearch } from './nelder-mead.js';
export type { NelderMeadOptions, NelderMeadResult } from './nelder-mead.js';
export { Rng } from './rng.js';
export { levenbergMarquardt, leastSquaresCovariance } from './levenberg-marquardt.js';
export type { LevenbergMarquardtOptions, LevenbergMarquardtResult } from './levenberg-marquardt.js';
export { zohDiscretise, zohFractionalDelay } from './zoh.js';
export { jacobianConditioning } from './jacobian-conditioning.js';
export type { JacobianConditioning } from './jacobian-conditioning.js';
export { findEncodingProblem } from './utf8.js';
export type { EncodingProblem } from './utf8.js';
export { chiSquareCdf, chiSquareQuantile, gammaP, logGamma } from './chi-square.js';
