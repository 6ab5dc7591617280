// Types for comlink's Node adapter, which ships an .mjs file without a matching .d.mts.
declare module 'comlink/dist/esm/node-adapter.mjs' {
  import type { Endpoint } from 'comlink';
  interface NodeEndpointLike {
    postMessage(message: unknown, transfer?: readonly unknown[]): void;
    on(type: string, listener: (...args: any[]) => void): unknown;
    off(type: string, listener: (...args: any[]) => void): unknown;
    start?: () => void;
  }
  export default function nodeEndpoint(nep: NodeEndpointLike): Endpoint;
}
