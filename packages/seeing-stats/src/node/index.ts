// Node adapter of @calmcrest/seeing-stats: streams and files. The pure computation lives in the root export.
export { streamLog, type StreamLogOptions, type StreamLogHandlers, type StreamLogResult } from './streamLog.js';
export { analyzeLog, type AnalyzeOptions, type AnalyzerReport } from './analyzeLog.js';
export { writeSyntheticLog, type SyntheticLogOptions } from './writeSyntheticLog.js';
export { previewLog, type LogPreview } from '../log/previewLog.js';
