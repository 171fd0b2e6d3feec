// The type of a parsed JSON response body in the tests.

/**
 * A response body as `Response.json()` or `JSON.parse` gives it: the tests read fields off it and
 * check them with assertions, which is where its shape is tested.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- untyped like Response.json(); the assertions check the shape
export type Json = any;
