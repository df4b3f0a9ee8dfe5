/**
 * Statistics for floorgap: normal distribution helpers, effective sample size, confidence
 * intervals for proportions and their differences, tests of proportions (including McNemar's
 * test for paired outcomes), Tango's score test and interval for a paired difference and its
 * weighted form, false discovery rate adjustments, inter-rater agreement (Cohen's and Fleiss' kappa), an empirical-Bayes Beta prior for many small proportions, power-law
 * learning-curve fits, and natural breaks (optimal 1-D k-means) for binning numeric columns. All
 * functions are pure and throw `RangeError` on NaN or out-of-domain input.
 */
export { normalQuantile, normalCdf, zForConfidence } from './normal.js';
export { kishEffectiveN } from './kish-effective-n.js';
export type { Interval } from './interval.js';
export { wilsonInterval } from './wilson-interval.js';
export type { LimitedEstimate, ProportionTerm } from './mover-interval.js';
export { moverInterval, moverLimits, moverPValue } from './mover-interval.js';
export { newcombeInterval } from './newcombe-interval.js';
export { intervalPValue } from './interval-p-value.js';
export { binomialTestTwoSided } from './binomial-test.js';
export { proportionTest } from './proportion-test.js';
export { twoProportionTest } from './two-proportion-test.js';
export type { McNemarResult } from './mcnemar-test.js';
export { mcnemarTest } from './mcnemar-test.js';
export type { TangoScoreResult } from './tango-score-test.js';
export { tangoScoreTest } from './tango-score-test.js';
export { tangoInterval } from './tango-interval.js';
export type { PairedMean, PairedWeightSums } from './paired-mean-interval.js';
export { pairedMeanInterval } from './paired-mean-interval.js';
export { benjaminiHochberg } from './benjamini-hochberg.js';
export { benjaminiYekutieli } from './benjamini-yekutieli.js';
export { cohensKappa } from './cohens-kappa.js';
export { fleissKappa, fleissItemAgreement } from './fleiss-kappa.js';
export type { BetaPrior } from './beta-binomial-fit.js';
export { fitBetaPrior, betaPosterior } from './beta-binomial-fit.js';
export type { PowerLawFit } from './power-law-fit.js';
export { fitPowerLaw, logGapWeight } from './power-law-fit.js';
export { chao1 } from './chao1.js';
export { naturalBreaks } from './natural-breaks.js';
