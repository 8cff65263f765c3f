import { BlockList, isIP } from 'node:net';

/**
 * The address of the client on the other end of a request, for the sign-in throttle.
 *
 * `X-Forwarded-For` is written by whoever sends the request, so it is believed only as far as it
 * was written by proxies this installation trusts (TRUSTED_PROXIES): starting from the socket
 * address, each hop that is a trusted proxy hands over to the address it says it received the
 * request from; the first address that is not a trusted proxy is the client (the "rightmost
 * untrusted address" rule). With no trusted proxies the client is the socket address, whatever the
 * header says.
 *
 * Next's route handlers do not see the socket. The web process of `npm start` (and of the
 * end-to-end tests), lib/ops/web-server.mjs, writes it into the header `x-rhobook-socket` as
 * "<token> <address>", with a token made when the process starts and kept in its environment, and
 * overwrites that header on every request, so a client cannot supply it. Without that header (a
 * development server, or a bare `next start`) the socket is unknown: the last X-Forwarded-For entry
 * is used, which Next sets to the socket address only when the client sent none, so it can be
 * forged there; README says so.
 */
export const SOCKET_HEADER = 'x-rhobook-socket';

/** Addresses and networks (CIDR) of trusted proxies, from a comma-separated list. Throws a RangeError naming a bad entry. */
export function parseTrustedProxies(text: string): BlockList {
  const list = new BlockList();
  for (const raw of text.split(',').map((s) => s.trim()).filter(Boolean)) {
    const [address, bits, extra] = raw.split('/');
    const kind = isIP(address);
    if (!kind || extra !== undefined) throw new RangeError(`TRUSTED_PROXIES: "${raw}" is not an IP address or a network like 10.0.0.0/8.`);
    const type = kind === 4 ? 'ipv4' : 'ipv6';
    if (bits === undefined) {
      list.addAddress(address, type);
    } else {
      const prefix = Number(bits);
      if (!/^\d+$/.test(bits) || prefix > (kind === 4 ? 32 : 128)) {
        throw new RangeError(`TRUSTED_PROXIES: "${raw}" has a prefix length that is not 0 to ${kind === 4 ? 32 : 128}.`);
      }
      list.addSubnet(address, prefix, type);
    }
  }
  return list;
}

/** The address in its usual written form: an IPv4 address mapped into IPv6 (::ffff:1.2.3.4) as 1.2.3.4. Null when not an address. */
export function normaliseAddress(raw: string | null | undefined): string | null {
  if (!raw) return null;
  let a = raw.trim();
  if (a.startsWith('[') && a.endsWith(']')) a = a.slice(1, -1);
  const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(a);
  if (mapped) a = mapped[1];
  return isIP(a) ? a.toLowerCase() : null;
}

function isTrusted(address: string, trusted: BlockList): boolean {
  return trusted.check(address, isIP(address) === 4 ? 'ipv4' : 'ipv6');
}

/**
 * The client's address from the socket address and the X-Forwarded-For entries (left to right as
 * received), believing the header only through trusted proxies (see the file comment). `unknown`
 * when there is no address at all.
 */
export function clientAddressFrom(socket: string | null, forwardedFor: string | null, trusted: BlockList): string {
  const hop = normaliseAddress(socket);
  if (!hop) return 'unknown';
  if (!isTrusted(hop, trusted)) return hop;
  const chain = (forwardedFor ?? '').split(',').map((s) => s.trim());
  let client = hop;
  for (let i = chain.length - 1; i >= 0; i--) {
    const a = normaliseAddress(chain[i]);
    if (!a) return client; // a garbled entry: stop at the last address we can vouch for
    client = a;
    if (!isTrusted(a, trusted)) return a;
  }
  return client;
}

/** The socket address stamped by lib/ops/web-server.mjs, if the header carries this process's token. */
export function stampedSocketAddress(header: string | null, token: string | undefined): string | null {
  if (!header || !token) return null;
  const space = header.indexOf(' ');
  if (space < 0 || header.slice(0, space) !== token) return null;
  return normaliseAddress(header.slice(space + 1));
}

/**
 * The client address of a request, from its headers (as next-auth hands them to `authorize`):
 * the stamped socket address when there is one, else the last X-Forwarded-For entry.
 */
export function requestClientAddress(header: (name: string) => string | null, trusted: BlockList, token = process.env.RHOBOOK_SOCKET_TOKEN): string {
  const forwarded = header('x-forwarded-for');
  const socket = stampedSocketAddress(header(SOCKET_HEADER), token);
  if (socket) return clientAddressFrom(socket, forwarded, trusted);
  const entries = (forwarded ?? '').split(',');
  return normaliseAddress(entries[entries.length - 1]) ?? 'unknown';
}
