/**
 * The API document in words, for the manual's reference page (src/app/(marketing)/manual/api):
 * each operation with its parameters, body fields and answers, and each schema as a short phrase
 * ("integer, 1 to 200, default 50", "one of: queued, running, ...", "RunDetail").
 */
import { openApiDocument, type JsonSchema } from "./document";

export interface FieldWords {
  name: string;
  where?: string;
  required: boolean;
  type: string;
  description: string;
}

export interface OperationWords {
  method: string;
  path: string;
  anchor: string;
  tag: string;
  summary: string;
  description: string;
  public: boolean;
  parameters: FieldWords[];
  body: { mediaType: string; required: boolean; fields: FieldWords[]; type: string } | null;
  responses: { status: string; description: string; type: string }[];
}

const METHODS = ["get", "post", "put", "patch", "delete"];

/** A schema as a phrase: its component name, or its type with bounds, values and default. */
export function schemaWords(s: JsonSchema | undefined): string {
  if (!s) return "any";
  if (typeof s.$ref === "string") return s.$ref.replace("#/components/schemas/", "");
  if (Array.isArray(s.anyOf) || Array.isArray(s.oneOf)) return `one of: ${((s.anyOf ?? s.oneOf) as JsonSchema[]).map(schemaWords).join(" | ")}`;
  if (s.const !== undefined) return JSON.stringify(s.const);
  if (Array.isArray(s.enum)) return `one of ${s.enum.map((v) => JSON.stringify(v)).join(", ")}`;
  const types = Array.isArray(s.type) ? (s.type as string[]) : s.type ? [s.type as string] : [];
  let words = types.length ? types.join(" or ") : "any";
  if (types.includes("array")) words = `array of ${schemaWords(s.items as JsonSchema | undefined)}`;
  if (types.includes("object") && s.properties) words = `object { ${Object.keys(s.properties as object).join(", ")} }`;
  const bounds: string[] = [];
  // zod writes the safe-integer range for a whole number without bounds of its own.
  const min = typeof s.minimum === "number" && s.minimum > Number.MIN_SAFE_INTEGER ? s.minimum : undefined;
  const max = typeof s.maximum === "number" && s.maximum < Number.MAX_SAFE_INTEGER ? s.maximum : undefined;
  if (min !== undefined && max !== undefined) bounds.push(`${min} to ${max}`);
  else if (min !== undefined) bounds.push(`at least ${min}`);
  else if (max !== undefined) bounds.push(`at most ${max}`);
  if (s.exclusiveMinimum !== undefined) bounds.push(`over ${s.exclusiveMinimum}`);
  if (s.exclusiveMaximum !== undefined) bounds.push(`under ${s.exclusiveMaximum}`);
  const count = (lo: unknown, hi: unknown, what: string) =>
    hi === undefined ? `at least ${lo} ${what}` : lo === undefined ? `at most ${hi} ${what}` : `${lo} to ${hi} ${what}`;
  if (s.minLength !== undefined || s.maxLength !== undefined) bounds.push(count(s.minLength, s.maxLength, "characters"));
  if (s.minItems !== undefined || s.maxItems !== undefined) bounds.push(count(s.minItems, s.maxItems, "items"));
  if (s.pattern) bounds.push(`matching ${s.pattern}`);
  if (s.default !== undefined) bounds.push(`default ${JSON.stringify(s.default)}`);
  return [words, ...bounds].join(", ");
}

function fieldsOf(schema: JsonSchema): FieldWords[] {
  const props = (schema.properties ?? {}) as Record<string, JsonSchema>;
  const required = new Set((schema.required as string[]) ?? []);
  return Object.entries(props).map(([name, s]) => ({ name, required: required.has(name), type: schemaWords(s), description: String(s.description ?? "") }));
}

function responseOf(doc: JsonSchema, r: JsonSchema): JsonSchema {
  if (typeof r.$ref !== "string") return r;
  const name = r.$ref.replace("#/components/responses/", "");
  return ((doc.components as JsonSchema).responses as Record<string, JsonSchema>)[name];
}

/** Every operation of the document, in its order, in words. */
export function operationsInWords(doc: JsonSchema = openApiDocument()): OperationWords[] {
  const out: OperationWords[] = [];
  for (const [path, item] of Object.entries(doc.paths as Record<string, Record<string, JsonSchema>>)) {
    for (const method of METHODS) {
      const op = item[method];
      if (!op) continue;
      const body = op.requestBody as JsonSchema | undefined;
      const [mediaType, media] = body ? Object.entries(body.content as Record<string, JsonSchema>)[0] : [];
      const bodySchema = media?.schema as JsonSchema | undefined;
      out.push({
        method: method.toUpperCase(),
        path,
        anchor: String(op.operationId),
        tag: ((op.tags as string[]) ?? [""])[0],
        summary: String(op.summary ?? ""),
        description: String(op.description ?? ""),
        public: Array.isArray(op.security) && op.security.length === 0,
        parameters: ((op.parameters as JsonSchema[]) ?? []).map((p) => ({
          name: String(p.name),
          where: String(p.in),
          required: Boolean(p.required),
          type: schemaWords(p.schema as JsonSchema),
          description: String(p.description ?? ""),
        })),
        body: bodySchema && mediaType ? { mediaType, required: Boolean(body?.required), fields: fieldsOf(bodySchema), type: schemaWords(bodySchema) } : null,
        responses: Object.entries(op.responses as Record<string, JsonSchema>).map(([status, r]) => {
          const resolved = responseOf(doc, r);
          const content = resolved.content as Record<string, JsonSchema> | undefined;
          const type = content
            ? Object.entries(content)
                .map(([m, c]) => `${m}: ${schemaWords(c.schema as JsonSchema)}`)
                .join("; ")
            : "no body";
          return { status, description: String(resolved.description ?? ""), type };
        }),
      });
    }
  }
  return out;
}
