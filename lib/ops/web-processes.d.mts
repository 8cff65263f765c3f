/** Types of web-processes.mjs (plain Node, run without a compiler). */
export declare function webProcessCount(env?: Record<string, string | undefined>, cores?: number): number;
export declare function runPrimary(count: number, options?: { log?: (msg: string) => void; graceMs?: number; initialMs?: number; maxMs?: number }): Promise<never>;
export declare function leaveWithPrimary(): void;
export declare function webNodeFlags(env?: Record<string, string | undefined>, cores?: number): string[];
