// Written by the web process (lib/ops/web-server.mjs) into every request before Next sees it: the
// address on the other end of the TCP socket, which Next's route handlers cannot see, prefixed by
// a token made when the process starts (RHOBOOK_SOCKET_TOKEN, in this process's environment only).
// Any value a client sent in this header is overwritten. Read by lib/auth/client-address.ts.
export const SOCKET_HEADER = 'x-rhobook-socket';

/** Overwrites the socket header of a Node request with "<token> <remote address>". */
export function stampSocket(req, token) {
  req.headers[SOCKET_HEADER] = `${token} ${req.socket?.remoteAddress ?? ''}`;
}
