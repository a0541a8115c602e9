/** The part of autocannon 9's API the load benchmark uses (the package ships no types). */
declare module 'autocannon' {
  import type { EventEmitter } from 'node:events';

  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    amount?: number;
    timeout?: number;
    headers?: Record<string, string>;
  }

  interface Instance extends EventEmitter {
    stop(): void;
    on(event: 'response', listener: (client: unknown, statusCode: number, resBytes: number, responseTime: number) => void): this;
    on(event: 'reqError', listener: (error: Error) => void): this;
    on(event: 'done', listener: (result: unknown) => void): this;
  }

  function autocannon(options: Options, callback?: (error: Error | null, result: unknown) => void): Instance;
  export default autocannon;
}
