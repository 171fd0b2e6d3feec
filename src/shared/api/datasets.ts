/** Datasets (`/api/v1/datasets`): uploaded measurements with their column mapping and units. */
import type { ColumnMapping, YMeasures } from "../csv";

/** The quantity on the x axis of a measurement. */
export type DatasetXQuantity = "field" | "gateVoltage" | "density";

export interface DatasetSummary {
  id: string;
  name: string;
  /** True for invented demonstration data. */
  synthetic: boolean;
  description: string | null;
  rows: number;
  xQuantity: DatasetXQuantity;
  xUnit: string;
  /** A two-terminal conductance is stored in e2/h; a Hall-bar resistance (yMeasures longitudinal or hall) in ohms. */
  yUnit: "e2/h" | "ohm";
  /** What y measures (mapping.yMeasures, two-terminal when the mapping has none). */
  yMeasures: YMeasures;
  hasSigma: boolean;
  hasTemperature: boolean;
  /** First and last x, in xUnit. */
  xRange: [number, number];
  /** Which column of the original file became which quantity, and their units. */
  mapping: ColumnMapping;
  originalFilename: string | null;
  originalBytes: number;
  /** sha256 of the original file. */
  dataHash: string;
  createdAt: string;
}

/** The points as stored (x in xUnit, y in yUnit). */
export interface DatasetPoints {
  x: number[];
  y: number[];
  sigma: number[] | null;
  temperatureK: number[] | null;
}

/** GET /api/v1/datasets/{id}. */
export interface DatasetDetail extends DatasetSummary {
  points: DatasetPoints;
}

export interface DatasetList {
  items: DatasetSummary[];
  /** createdAt of the last item: pass as ?before= for the next page. */
  nextBefore: string | null;
}

export interface PeriodOptions {
  /** Degree of the polynomial background removed before the transform (0-8). */
  backgroundDegree?: number;
  /** Zero-padding factor over the next power of two of the resampled length (1-64). */
  zeroPadFactor?: number;
  /** Ignore frequencies below this many oscillations across the field window (default 1.5). */
  minCyclesInWindow?: number;
}

/** A moire period read from a field period under one assumption about the enclosed area. */
export interface PeriodReading {
  assumption: string;
  areaNm2: number;
  periodNm: number;
  twistDegrees: number | null;
}

export interface PeriodAnalysis {
  peak: { frequencyPerTesla: number; amplitude: number; prominence: number };
  periodTesla: number;
  fluxQuantumWeber: number;
  areaNm2: number;
  /** The reading used by default: one flux quantum h/e through one triangle of the network. */
  perTriangle: PeriodReading;
  /** Alternative reading: one flux quantum per moire unit cell (two triangles). */
  perUnitCell: PeriodReading;
  spectrum: { frequencyPerTesla: number[]; amplitude: number[] };
  background: number[];
  oscillation: number[];
  settings: Required<PeriodOptions> & { uniformPoints: number; fftLength: number; resampled: boolean; window: "hann" };
  fieldRangeTesla: [number, number];
}

/** POST /api/v1/datasets/{id}/period: the field period of the oscillations and what it means. */
export interface DatasetPeriod extends PeriodAnalysis {
  /** The field values used (tesla). */
  field: number[];
  datasetId: string;
  dataHash: string;
  synthetic: boolean;
}
