/** Types of http-guard.mjs (plain Node, run without a compiler). */
import type { IncomingMessage, ServerResponse } from 'node:http';
export declare const ALLOWED_METHODS: string[];
export declare function refuseUnknownMethod(req: Pick<IncomingMessage, 'method'>, res: Pick<ServerResponse, 'writeHead' | 'end'>): boolean;
export declare const DEVELOPMENT_SECRET: string;
export declare function productionSecretProblem(env: Record<string, string | undefined>): string | null;
