/** Survey corrections estimated from a site's units: the public surface of `shared/survey-fit`. */
export {
  angleBetweenNormalsDeg,
  fitSurveyCorrections,
  modelError,
  sampleSigmaWm2,
  TooFewEpochs,
  type EstimateStatus,
  type FitEpoch,
  type FitSample,
  type ModelError,
  type ParameterEstimate,
  type SkyOf,
  type SurveyFitInput,
  type SurveyFitResult,
} from './survey-fit';
export {
  applyCorrections,
  correctionParameters,
  HORIZON_SECTOR_DEG,
  type CorrectionKind,
  type CorrectionParameter,
} from './survey-corrections';
export { choleskySolve, levenbergMarquardt, type BoundedProblem, type LmOptions, type LmResult } from './levenberg-marquardt-1963';
