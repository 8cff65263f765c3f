/** Types of socket-stamp.mjs (plain Node, run without a compiler). */
export declare const SOCKET_HEADER: string;
export declare function stampSocket(
  req: { headers: Record<string, string | string[] | undefined>; socket?: { remoteAddress?: string } },
  token: string,
): void;
