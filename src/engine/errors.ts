/** Typed engine errors. The API maps EngineInputError to HTTP 422, EngineLimitError to 413 and the
 * command line maps EngineInputError and EngineLimitError to exit code 2. */

export interface EngineIssue {
  /** Dotted path of the offending field, e.g. "network.node.forward". */
  field: string;
  /** One-line description: what is wrong and what is allowed. */
  message: string;
}

export class EngineInputError extends Error {
  readonly field: string;
  readonly issues: EngineIssue[];
  constructor(field: string, message: string, issues?: EngineIssue[]) {
    super(`${field}: ${message}`);
    this.name = "EngineInputError";
    this.field = field;
    this.issues = issues && issues.length > 0 ? issues : [{ field, message }];
  }
}

/** A computation refused before it starts: its estimated memory or compute time is over the engine's limit. */
export class EngineLimitError extends Error {
  readonly reason: string;
  /** Which limit: peak memory, or compute time. */
  readonly resource: "memory" | "computeTime";
  readonly estimatedPeakMemoryBytes: number;
  readonly limitBytes: number;
  readonly estimatedComputeSeconds?: number;
  readonly limitComputeSeconds?: number;
  constructor(reason: string, estimatedPeakMemoryBytes: number, limitBytes: number, time?: { estimatedComputeSeconds: number; limitComputeSeconds: number }) {
    super(reason);
    this.name = "EngineLimitError";
    this.reason = reason;
    this.resource = time ? "computeTime" : "memory";
    this.estimatedPeakMemoryBytes = estimatedPeakMemoryBytes;
    this.limitBytes = limitBytes;
    this.estimatedComputeSeconds = time?.estimatedComputeSeconds;
    this.limitComputeSeconds = time?.limitComputeSeconds;
  }
}

export class EngineCancelledError extends Error {
  constructor() {
    super("computation cancelled");
    this.name = "EngineCancelledError";
  }
}

/** A dense kernel met a singular (or numerically singular) matrix. */
export class SingularMatrixError extends Error {
  constructor(what: string) {
    super(`singular matrix in ${what}`);
    this.name = "SingularMatrixError";
  }
}
