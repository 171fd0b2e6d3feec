/**
 * Types of the API contract that are inferred from zod schemas (`z.output<typeof ...>`): the
 * generator of the answer schemas (scripts/build-openapi.ts) writes a `$ref` to the component of
 * the same name, and the document (document.ts) builds that component from the schema itself.
 * The value says which side of the schema the type is (`output`: after defaults are filled in).
 */
export const ZOD_TYPES = {
  Computation: "output",
  ConductanceComputation: "output",
  SpectrumComputation: "output",
  DosComputation: "output",
  LdosComputation: "output",
  LocalizationComputation: "output",
  HallBarComputation: "output",
  NetworkDefinition: "input",
  Axis: "input",
  Ensemble: "input",
} as const;
export type ZodTypeName = keyof typeof ZOD_TYPES;
