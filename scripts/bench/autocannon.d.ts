// The little of autocannon 9 that the benches use (it ships no types; @types/autocannon is not installed).
declare module "autocannon" {
  type Options = { url: string; connections?: number; duration?: number; headers?: Record<string, string>; method?: string; body?: string };
  type Result = { non2xx: number; errors: number; timeouts: number; requests: { total: number }; latency: Record<string, number> };
  type Instance = Promise<Result> & { on(event: "response", cb: (client: unknown, statusCode: number, resBytes: number, responseTime: number) => void): void };
  function autocannon(opts: Options): Instance;
  export default autocannon;
}
