/** Shapes of the datasets and fits API as the pages read them (docs/data-and-fits.md). */
export interface DatasetSummary {
  id: string;
  name: string;
  synthetic: boolean;
  description: string | null;
  rows: number;
  xQuantity: "field" | "gateVoltage" | "density";
  xUnit: string;
  yUnit: "e2/h";
  hasSigma: boolean;
  hasTemperature: boolean;
  xRange: [number, number];
  mapping: Record<string, string>;
  originalFilename: string | null;
  dataHash: string;
  createdAt: string;
}

export interface DatasetRecord extends DatasetSummary {
  points: { x: number[]; y: number[]; sigma: number[] | null; temperatureK: number[] | null };
}

export interface PeriodReading {
  assumption: string;
  areaNm2: number;
  periodNm: number;
  twistDegrees: number | null;
}

export interface PeriodResult {
  peak: { frequencyPerTesla: number; amplitude: number; prominence: number };
  periodTesla: number;
  areaNm2: number;
  perTriangle: PeriodReading;
  perUnitCell: PeriodReading;
  spectrum: { frequencyPerTesla: number[]; amplitude: number[] };
  background: number[];
  oscillation: number[];
  field: number[];
  settings: Record<string, unknown>;
}

export interface FitParameterResult {
  parameter: string;
  value: number;
  stderr: number | null;
  initial: number;
  min: number;
  max: number;
  atBound: boolean;
}

export interface FitRecord {
  id: string;
  datasetId: string;
  datasetName: string | null;
  datasetSynthetic?: boolean;
  status: "queued" | "running" | "succeeded" | "failed" | "cancelled";
  progress: number;
  lastIteration: { iteration: number; chi2: number } | null;
  result: {
    parameters: FitParameterResult[];
    chi2PerDof: number;
    chi2?: number;
    dof?: number;
    weighted?: boolean;
    correlation?: number[][];
    curve?: { x: number[]; y: number[] };
    residuals?: number[];
    iterations?: number;
    converged?: boolean;
    warnings?: string[];
  } | null;
  error: { code: string; message: string } | null;
  settings: { network: unknown; computation: unknown; sweepParameter: string; fit: { parameter: string; initial: number; min: number; max: number }[]; options: Record<string, unknown> };
  estimatedComputeSeconds: number;
  computeSeconds: number | null;
  engineVersion: string | null;
  dataHash: string;
  createdAt: string;
  finishedAt: string | null;
}
