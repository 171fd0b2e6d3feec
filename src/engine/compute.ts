/** The single entry point: compute(input) -> the result object the command line prints. */
import { computeConductance, type ConductanceResult } from "./compute/conductance";
import type { ComputeOptions } from "./compute/progress";
import { checkResourceLimits } from "./cost";
import { inputHash } from "./hash";
import type { ComputeInput } from "./schema";
import { engineVersion } from "./version";
import { computeSpectrum, type SpectrumResult } from "./compute/spectrum";
import { computeDos, type DosResult } from "./compute/dos";
import { computeLdos, type LdosResult } from "./compute/ldos";
import { computeLocalization, type LocalizationResult } from "./compute/localization";
import { computeHallBar, type HallBarResult } from "./compute/hall-bar";

type WithHeader<T> = { engineVersion: string; inputHash: string } & T;
export type ComputeResult =
  | WithHeader<ConductanceResult>
  | WithHeader<SpectrumResult>
  | WithHeader<DosResult>
  | WithHeader<LdosResult>
  | WithHeader<LocalizationResult>
  | WithHeader<HallBarResult>;

/**
 * Run one computation (synchronous, pure). Refuses up front a computation over the memory limit
 * (EngineLimitError); reports progress; throws EngineCancelledError when shouldCancel() says so.
 */
export function compute(input: ComputeInput, options: ComputeOptions = {}): ComputeResult {
  checkResourceLimits(input);
  const header = { engineVersion: engineVersion(), inputHash: inputHash(input) };
  const { network, computation } = input;
  switch (computation.kind) {
    case "conductance":
      return { ...header, ...computeConductance(network, computation, options) };
    case "spectrum":
      return { ...header, ...computeSpectrum(network, computation, options) };
    case "dos":
      return { ...header, ...computeDos(network, computation, options) };
    case "ldos":
      return { ...header, ...computeLdos(network, computation, options) };
    case "localization":
      return { ...header, ...computeLocalization(network, computation, options) };
    case "hallBar":
      return { ...header, ...computeHallBar(network, computation, options) };
  }
}
