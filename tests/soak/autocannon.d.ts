// autocannon 8 ships no type declarations; the load test uses this much of it.
declare module "autocannon" {
  interface Request {
    method?: string;
    path?: string;
    headers?: Record<string, string>;
    body?: string;
  }
  interface Result {
    requests: { total: number; average: number };
    errors: number;
    timeouts: number;
    non2xx: number;
  }
  /** One connection; which request it last sent is read from its iterator. */
  interface Client {
    requestIterator?: { currentRequestIndex?: number };
  }
  interface Instance {
    on(event: "response", fn: (client: Client, statusCode: number, bytes: number, responseTime: number) => void): void;
    on(event: "done", fn: (result: Result) => void): void;
    on(event: "error", fn: (err: Error) => void): void;
  }
  function autocannon(opts: { url: string; connections: number; duration: number; timeout: number; requests: Request[]; connectionRate?: number }): Instance;
  namespace autocannon {
    export type { Client, Request, Result };
  }
  export default autocannon;
}
