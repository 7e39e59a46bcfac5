// The part of autocannon's API that tests/bench/http.ts uses (the package ships no types).
declare module "autocannon" {
  namespace autocannon {
    interface Request {
      method?: string;
      path?: string;
      headers?: Record<string, string>;
      body?: string;
    }
    interface Client {
      setRequests(requests: Request[]): void;
      on(event: "response", listener: (statusCode: number, resBytes: number, responseTime: number) => void): void;
    }
    interface Options {
      url: string;
      connections?: number;
      duration?: number;
      requests?: Request[];
      setupClient?: (client: Client) => void;
    }
    interface Result {
      requests: { average: number };
      errors: number;
      timeouts: number;
    }
    interface Instance {
      on(event: string, listener: (...args: unknown[]) => void): void;
    }
    function track(instance: Instance, options?: Record<string, boolean>): void;
  }
  function autocannon(options: autocannon.Options, callback: (error: Error | null, result: autocannon.Result) => void): autocannon.Instance;
  export default autocannon;
}
