/**
 * Spillway measurement core: from a call-record or interval-count CSV to a characterisation
 * (busy hour, offered traffic, peakedness, holding-time fits, daily profile) and a scenario.
 * Pure TypeScript, no framework or database code; everything here also runs in the browser
 * except write-demo-csv.ts (a Node script).
 *
 *   readMeasurementCsv(bytes | AsyncIterable<Uint8Array>, mapping, { maxBytes?, onProgress? }): Promise<MeasuredData>
 *   previewCsv(bytes | AsyncIterable<Uint8Array>, rows?): Promise<CsvPreview>          // header, first rows, guessed mapping
 *   characterise(data, { intervalMinutes?, busyHourStepMinutes?, group?, fit?, onProgress? }): Characterisation
 *   fitHoldingTimes(durations, { replicates?, seed?, maxSample? }): HoldingFit
 *   makeScenario(characterisation, { source?, holding?, targetBlocking?, seed?, replications? }): MadeScenario
 *
 * Bad files throw MeasurementInputError (kind "input", code, line, column) with a message naming the line.
 */
export { MeasurementInputError, type MeasurementErrorCode } from "./errors";
export {
  columnMappingSchema,
  callRecordMappingSchema,
  intervalCountMappingSchema,
  MAX_FILE_BYTES,
  MAX_GROUPS,
  OUTCOMES,
  PREVIEW_ROWS,
  type ColumnMapping,
  type ColumnMappingInput,
} from "./mapping";
export { readMeasurementCsv, previewCsv, parseMapping, guessMapping, type CsvPreview, type ByteSource } from "./read";
export type { MeasuredData, CallRecordSet, IntervalCountSet } from "./records";
export { TIMESTAMP_FORMAT } from "./timestamps";
export { formatBytes } from "./encoding";
export { characterise, BUSY_HOUR_DEFINITION, type Characterisation, type CharacteriseOptions } from "./characterise";
export { fitHoldingTimes, type HoldingFit, type FamilyFit } from "./fit";
export { FAMILIES, FAMILY_NAMES, type FamilyName } from "./laws";
export { makeScenario, makeScenarioOptionsSchema, gammaRenewalPeakedness, type MadeScenario, type MakeScenarioOptions } from "./scenario";
export { onOffPeakedness, shapeOfFamily, shapeOfSample } from "./peakedness";
export { DEMO_TRAFFIC, DEMO_CSV_PATH } from "./demo";
