// Answers checked against the API's OpenAPI document: every JSON answer of a known route (method
// and path template) must validate against the document's schema for its status, with ajv
// (JSON Schema draft 2020-12). tests/support/services.ts `api()` runs every answer through the
// document the running app serves; tests/unit/server/openapi/document.test.ts compiles every
// schema of the document with the same settings.
import { Ajv2020, type ErrorObject, type ValidateFunction } from "ajv/dist/2020";

type Doc = { paths: Record<string, Record<string, { responses: Record<string, unknown> }>>; components: { responses?: Record<string, unknown> } };

export interface AnswerCheck {
  /** "GET /api/v1/runs/{id}", or null when no route of the document matches (nothing was checked). */
  route: string | null;
  status: number;
  /** ajv's errors, or a sentence when the status or the media type is not in the document; empty when the answer is valid. */
  problems: string[];
}

const DOC_ID = "triskel-openapi";
const pointer = (parts: string[]) => parts.map((p) => p.replaceAll("~", "~0").replaceAll("/", "~1")).join("/");

/**
 * A validator over one document. ajv runs in non-strict mode (the document's OpenAPI keywords
 * around the schemas are not JSON Schema) and checks no `format` (ajv-formats is not installed;
 * the answers' schemas carry none).
 */
export function answerValidator(doc: unknown) {
  const d = doc as Doc;
  const ajv = new Ajv2020({ strict: false, allErrors: true, validateFormats: false });
  ajv.addSchema(doc as object, DOC_ID);
  const templates = Object.keys(d.paths).map((template) => ({
    template,
    params: (template.match(/\{/g) ?? []).length,
    pattern: new RegExp("^" + template.replace(/[.]/g, "\\.").replace(/\{\w+\}/g, "[^/]+") + "$"),
  }));
  const compiled = new Map<string, ValidateFunction>();
  let checked = 0;

  function routeOf(method: string, path: string): string | null {
    const bare = path.replace(/[?#].*$/, "");
    const m = method.toLowerCase();
    const found = templates.filter((t) => t.pattern.test(bare) && d.paths[t.template][m]).sort((a, b) => a.params - b.params)[0];
    return found ? `${method.toUpperCase()} ${found.template}` : null;
  }

  /** The media types and schema pointers of one documented answer (following a `$ref` to components/responses). */
  function answerOf(template: string, method: string, status: number): { content?: Record<string, unknown>; ptr: string[] } | undefined {
    let response = d.paths[template][method].responses[String(status)] as { $ref?: string; content?: Record<string, unknown> } | undefined;
    let ptr = ["paths", template, method, "responses", String(status)];
    if (response?.$ref) {
      const name = response.$ref.replace("#/components/responses/", "");
      response = d.components.responses?.[name] as typeof response;
      ptr = ["components", "responses", name];
    }
    return response ? { content: response.content, ptr } : undefined;
  }

  function check(method: string, path: string, status: number, contentType: string | null, body: unknown): AnswerCheck {
    const route = routeOf(method, path);
    if (!route) return { route, status, problems: [] };
    const [m, template] = [method.toLowerCase(), route.slice(route.indexOf(" ") + 1)];
    const answer = answerOf(template, m, status);
    if (!answer) return { route, status, problems: [`status ${status} is not documented for ${route}`] };
    const json = (contentType ?? "").includes("application/json");
    if (!json) return { route, status, problems: [] };
    if (!answer.content?.["application/json"]) return { route, status, problems: [`${route} ${status}: the document has no application/json answer`] };
    const ref = `${DOC_ID}#/${pointer([...answer.ptr, "content", "application/json", "schema"])}`;
    let validate = compiled.get(ref);
    if (!validate) {
      validate = ajv.compile({ $ref: ref });
      compiled.set(ref, validate);
    }
    checked++;
    return { route, status, problems: validate(body) ? [] : describeErrors(validate.errors ?? []) };
  }

  return { check, routeOf, checkedCount: () => checked, ajv };
}

function describeErrors(errors: ErrorObject[]): string[] {
  return errors.slice(0, 12).map((e) => `${e.instancePath || "(body)"} ${e.message ?? ""}${e.params ? ` ${JSON.stringify(e.params)}` : ""}`.trim());
}

/** One line for a failed test: the route, the status and the ajv errors. */
export function describeCheck(c: AnswerCheck, sent: string): string {
  return `The answer to ${sent} does not match the API document (${c.route}, status ${c.status}):\n  ${c.problems.join("\n  ")}`;
}
