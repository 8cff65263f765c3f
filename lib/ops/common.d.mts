/** Types of the parts of common.mjs that TypeScript code uses (plain Node, run without a compiler). */
export declare const root: string;
export declare const dataDir: string;
/** Builds the Next app when .next is missing or built from other sources; true when it built. */
export declare function ensureBuild(options?: { quiet?: boolean }): boolean;
