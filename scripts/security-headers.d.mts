// Types for security-headers.mjs, read by vite.config.ts and the tests.
export declare const CONTENT_SECURITY_POLICY: string;
export declare const HEADER_CONTENT_SECURITY_POLICY: string;
export declare const SECURITY_HEADERS: Readonly<Record<string, string>>;
