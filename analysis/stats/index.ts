// Tilthmark's statistics: pure functions over plain arrays and records (no database, no React).

// Distributions (thin wrappers over jstat)
export {
  fQuantile,
  fUpperTailP,
  normalQuantile,
  normalUpperTailP,
  studentizedRangeQuantile,
  studentizedRangeUpperP,
  tQuantile,
  tTwoSidedP,
} from "./distributions";

// Linear-model core
export { crossedTerm, factorFromLabels, termFactors, type Factor, type ModelData, type Term } from "./model-data";
export { designMatrix, sumToZeroCode, type DesignMatrix } from "./design-matrix";
export { leastSquares, residualSumOfSquares, type LeastSquaresFit } from "./least-squares";
export {
  closedFormFit,
  fitLinearModel,
  isBalanced,
  leastSquaresMeans,
  leastSquaresModelFit,
  type CellMeans,
  type FitMethod,
  type LinearModelFit,
  type TermSums,
} from "./linear-model";

// ANOVA by design
export {
  anovaRows,
  rowOf,
  type AnovaResult,
  type AnovaRow,
  type DesignName,
  type MeanSet,
  type MissingValue,
  type VarianceComponent,
} from "./anova-table";
export { toModelData, type LeveledPlot, type PlotValue } from "./plot-records";
export {
  factorialAnova,
  factorialTerms,
  nestedSplitPlotTerms,
  oneWayAnova,
  rcbdAnova,
  splitPlotAnova,
  splitPlotMeanVariance,
  splitPlotTerms,
  type AnalysisOptions,
  type BlockedPlot,
  type FactorialOptions,
  type SplitPlotOptions,
  type TreatmentPlot,
} from "./designs";

// Mean separation and contrasts
export { linearCombinationVariance, pairDifferenceVariance, satterthwaiteDf, type VariancePart } from "./satterthwaite";
export { compactLetterDisplay } from "./letters";
export {
  compareTwoMeans,
  compareWithCheck,
  separateMeans,
  separateMeansWithin,
  type ComparisonMethod,
  type ComparisonOptions,
  type MeanSeparation,
  type PairwiseComparison,
  type SeparatedMean,
} from "./comparisons";
export {
  checkContrast,
  checkOrthogonality,
  orthogonalPolynomialContrasts,
  testContrast,
  testContrasts,
  treatmentVsCheckContrasts,
  type ContrastResult,
  type ContrastSpec,
  type OrthogonalityCheck,
} from "./contrasts";

// Diagnostics
export {
  brownForsythe,
  normalQqPoints,
  residualDiagnostics,
  shapiroWilk,
  studentizedResiduals,
  type FTest,
  type QqPoint,
  type ResidualDiagnostics,
  type ResidualRow,
  type ShapiroWilkResult,
} from "./diagnostics";

// Across seasons
export {
  baselineAncova,
  greenhouseGeisserEpsilon,
  MissingPlotSeasonsError,
  missingPlotSeasons,
  perSeasonAnalyses,
  plotSlopes,
  rateOfChange,
  seasonsAnalysis,
  splitPlotInTime,
  withinPlotSeasonCovariance,
  type BaselineAncova,
  type BaselinePlot,
  type MissingPlotSeason,
  type PlotSlope,
  type RateOfChange,
  type SeasonLayout,
  type SeasonPlot,
  type SeasonsAnalysis,
  type SphericityCorrection,
  type TimedPlot,
} from "./seasons";
