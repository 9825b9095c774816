// Types for serve.mjs, read by the tests.
import type { Server } from 'node:http';

export declare const HOST: string;
export declare const DEFAULT_PORT: number;
export declare const DEFAULT_ROOT: string;
export declare function requestPath(rawUrl: string | undefined): string | undefined;
export declare function createAppServer(options?: { root?: string }): Server;
export declare function serveApp(options?: { root?: string; port?: number }): Promise<{ server: Server; url: string }>;
