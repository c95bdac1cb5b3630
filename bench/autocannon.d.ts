// The part of autocannon 8 (no bundled types) that bench/load.ts uses.
declare module "autocannon" {
  import type { EventEmitter } from "node:events";

  interface AutocannonRequest {
    method?: string;
    path?: string;
    headers?: Record<string, string>;
    body?: string;
    /** Called before each send of this request; `context` lives until the request list starts over. */
    setupRequest?: (request: AutocannonRequest, context: Record<string, unknown>) => AutocannonRequest;
    onResponse?: (status: number, body: string, context: Record<string, unknown>, headers: Record<string, string>) => void;
  }

  interface AutocannonOptions {
    url: string;
    connections?: number;
    /** Seconds. */
    duration?: number;
    /** Seconds before a request counts as timed out. */
    timeout?: number;
    pipelining?: number;
    method?: string;
    headers?: Record<string, string>;
    requests?: AutocannonRequest[];
  }

  interface AutocannonResult {
    requests: { average: number; total: number };
    latency: { p50: number; p99: number; average: number; max: number };
    errors: number;
    timeouts: number;
    non2xx: number;
    duration: number;
  }

  interface AutocannonInstance extends EventEmitter, PromiseLike<AutocannonResult> {
    stop(): void;
  }

  function autocannon(options: AutocannonOptions): AutocannonInstance;
  export default autocannon;
  export type { AutocannonRequest, AutocannonOptions, AutocannonResult, AutocannonInstance };
}
