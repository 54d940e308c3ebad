// @calmcrest/seeing-stats: pure, browser-safe seeing computation (no node: imports here; see ./node for files).

// Errors: the one failure contract.
export { SeeingInputError, LogFormatError } from './errors.js';
export { describeLogFormatError, type LogFormatDescription } from './describeLogFormatError.js';

// Physics: DIMM response, Fried parameter, seeing, normalisation to zenith and 500 nm, corrections.
export { ARCSEC_PER_RADIAN, SEEING_CONSTANT, REFERENCE_WAVELENGTH_NM } from './physics/constants.js';
export {
  responseCoefficients,
  RESPONSE_SETS,
  RESPONSE_SET_LABELS,
  RESPONSE_SET_NAMES,
  type ResponseSet,
  type ResponseCoefficients,
} from './physics/responseCoefficients.js';
export { r0FromVariance } from './physics/r0FromVariance.js';
export { varianceFromR0 } from './physics/varianceFromR0.js';
export { seeingFromR0 } from './physics/seeingFromR0.js';
export { r0FromSeeing } from './physics/r0FromSeeing.js';
export { seeingToZenith, seeingAtZenithAngle, r0ToZenith, r0AtZenithAngle } from './physics/toZenith.js';
export { zenithFromAirmass } from './physics/zenithFromAirmass.js';
export { r0AtWavelength, seeingAtWavelength } from './physics/toWavelength.js';
export { exposureTimeCorrection } from './physics/exposureTimeCorrection.js';
export { vonKarmanFwhm, type VonKarmanOptions } from './physics/vonKarmanFwhm.js';
export { tau0ToReference } from './physics/tau0ToReference.js';
export { theta0ToReference } from './physics/theta0ToReference.js';

// Statistics: percentiles, log-normal fit, tests, bootstrap, random numbers.
export { percentile, percentileSorted } from './stats/percentile.js';
export { fitLogNormal, type LogNormalFit } from './stats/fitLogNormal.js';
export { ksDistanceLogNormal } from './stats/ksDistanceLogNormal.js';
export { normalCdf } from './stats/normalCdf.js';
export { mannWhitney, type MannWhitneyResult } from './stats/mannWhitney.js';
export { bootstrapPooledMedian, bootstrapPooledMedianSorted, bootstrapPooledMedianPairSorted, type GroupedValues } from './stats/bootstrapPooledMedian.js';
export { argsortPositive, sortPositive } from './stats/argsortPositive.js';
export { createRandom, normalDeviate, RandomStream } from './stats/random.js';
export { weightedMedian, weightedMedianSorted } from './stats/weightedMedian.js';
export { wilcoxonSignedRank, type WilcoxonSignedRankResult } from './stats/wilcoxonSignedRank.js';
export { bootstrapGroupFraction } from './stats/bootstrapGroupFraction.js';
export { nightIntervalStatus, MINIMUM_NIGHTS_FOR_INTERVAL, APPROXIMATE_INTERVAL_MAX_NIGHTS, type NightIntervalStatus } from './stats/nightIntervalStatus.js';
export { simulateIntervalCoverage, type CoverageOptions, type CoverageResult } from './stats/simulateIntervalCoverage.js';

// Log format: fields, mapping, delimiter, rows, filters, preview.
export { LOG_FIELDS, LOG_FIELD_INFO, isLogField, type LogField, type ColumnMapping, type MappingOverrides, type FieldRequirement } from './log/logFields.js';
export { proposeMapping, exactMapping } from './log/proposeMapping.js';
export { checkMapping } from './log/checkMapping.js';
export { detectDelimiter, type LogDelimiter } from './log/detectDelimiter.js';
export { parseUtcTime } from './log/parseUtcTime.js';
export { createSunAltitude, type SiteLocation } from './log/sunAltitude.js';
export {
  createRowReader,
  chooseMeasure,
  interlacedFields,
  noiseFields,
  validateMonitor,
  DEFAULT_ANISOTROPY_RATIO_LIMIT,
  DEFAULT_MIN_SEEING_ARCSEC,
  DEFAULT_MAX_SEEING_ARCSEC,
  EARLIEST_PLAUSIBLE_TIME_MS,
  LATEST_PLAUSIBLE_AHEAD_MS,
  defaultPlausibility,
  validatePlausibility,
  type PlausibilityWindow,
  EXPOSURE_CORRECTION_METHOD,
  NOISE_SUBTRACTION_METHOD,
  MAX_EXPOSURE_CORRECTION_FACTOR,
  MAX_NOISE_SHARE,
  type ExposureCorrection,
  type MonitorSettings,
  type LogSample,
  type RowResult,
  type RowRejectReason,
  type FilterRejectReason,
  type RejectReason,
  type MeasureSource,
} from './log/createRowReader.js';
export { filterReason, DEFAULT_FILTERS, type FilterSettings } from './log/filterReason.js';
export { FILTER_LIMIT_MESSAGES, filterSettingAllowed, validateFilters } from './log/filterLimits.js';
export { previewLog, isCommentOrBlank, type LogPreview } from './log/previewLog.js';
export {
  LineSplitter,
  splitLines,
  splitFields,
  isCommentOrBlankLine,
  readHeaderLine,
  rejectNonText,
  listHeaders,
  MAX_LINE_CHARS,
  LINE_REJECT_REASONS,
  type LineRejectReason,
  type SplitResult,
} from './log/splitLog.js';
export { LogTextReader, SNIFF_CHARS, type LogTextHandlers, type LogLayout } from './log/readLogText.js';
export {
  DELIMITER_CHOICES,
  WHITESPACE_DELIMITER,
  choiceOfDelimiter,
  delimiterName,
  delimiterOfChoice,
  layoutOf,
  parseDelimiterChoice,
  splitWhitespace,
  type DelimiterChoice,
  type LayoutChoices,
} from './log/delimiters.js';
export { readingWarnings, WARN_UNUSABLE_SHARE, READING_WARNING_CODES, type ReadingWarning, type ReadingWarningCode } from './log/readingWarnings.js';

// Summaries: one site, two sites compared, nights.
export {
  summarizeSeeing,
  summarizeSeeingPresorted,
  thresholdKey,
  DEFAULT_THRESHOLDS_ARCSEC,
  type SampleColumns,
  type SummaryOptions,
  type SeeingSummary,
  type SortedSeeing,
  type SeasonStatistics,
} from './summary/summarizeSeeing.js';
export { briefSeeing, type SeeingBrief } from './summary/briefSeeing.js';
export { seasonBalancedMedian, seasonBalancedMedianSorted, monthOfDayNumber, MONTH_NAMES, type SeasonBalancedMedian } from './summary/seasonBalancedMedian.js';
export { hemisphereSeasons, seasonIndexOfMonth, SEASON_CODES, type Season, type SeasonCode, type SeasonName } from './summary/hemisphereSeasons.js';
export { summarizeTurbulenceParameter, type TurbulenceParameterSummary } from './summary/summarizeTurbulenceParameter.js';
export { summaryWarnings, type SummaryWarning, type SummaryWarningCode, type SummaryContext } from './summary/summaryWarnings.js';
export { checkLongitudeSign, type LongitudeSignCheck } from './summary/checkLongitudeSign.js';
export {
  selectSamples,
  selectRun,
  selectRuns,
  lowerBoundTime,
  SELECTION_REASONS,
  type StoredSampleColumns,
  type ExcludedWindow,
  type SampleRun,
  type SortedSampleRun,
  type SampleQuery,
  type SelectionReason,
  type RunSelection,
  type SelectedSamples,
} from './summary/selectSamples.js';
export { compareSeeing, type SiteComparison } from './summary/compareSeeing.js';
export { pairNights, type NightPairing, type PairedNight, type PairingOptions } from './summary/pairNights.js';
export { comparePairedNights, type PairedComparison } from './summary/comparePairedNights.js';
export { predictTelescopeFwhm, type TelescopePrediction } from './summary/predictTelescopeFwhm.js';
export { nightLabel, localSolarHour, nightDayNumber, solarOffsetMs, normalizeLongitudeDeg } from './summary/nightLabel.js';

// Comparing sites: verdict sentences, the nightly-difference histogram, warnings for a side-by-side table.
export { describePairedVerdict, formatPValue, formatSignedArcsec } from './compare/describePairedVerdict.js';
export { differenceHistogram, type DifferenceBin } from './compare/differenceHistogram.js';
export {
  comparisonWarnings,
  MINIMUM_OVERLAP_MONTHS,
  THIN_MONTH_NIGHTS,
  type ComparisonWarning,
  type ComparisonWarningCode,
  type ComparisonWarnings,
  type ComparedSiteFacts,
} from './compare/comparisonWarnings.js';
export { prepareSite, comparePreparedPaired, comparePreparedUnpaired, type PreparedSite } from './compare/preparedComparison.js';
export { parseTimeAs, parseUtcOffsetMinutes, timeFormatExample, TIME_FORMATS, type TimeFormat } from './log/parseTimeAs.js';
