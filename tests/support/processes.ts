import net from 'node:net';

/** A TCP port free on loopback just now (the kernel's pick). */
export async function sparePort(): Promise<number> {
  const server = net.createServer();
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  const p = (server.address() as net.AddressInfo).port;
  await new Promise<void>((r) => server.close(() => r()));
  return p;
}

/** Whether a process with this pid is running (signal 0 checks without sending anything). */
export function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}
