/** Free TCP ports on loopback, chosen by the operating system (ephemeral range, never the team's fixed ports). */
import net from 'node:net';

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const p = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(p));
    });
  });
}

/** `n` distinct free ports. */
export async function freePorts(n: number): Promise<number[]> {
  const out = new Set<number>();
  while (out.size < n) out.add(await freePort());
  return [...out];
}

/** Polls `check` every 250 ms until it holds or `ms` pass; errors count as "not yet". */
export async function waitFor(check: () => Promise<boolean>, ms: number): Promise<boolean> {
  const until = Date.now() + ms;
  while (Date.now() < until) {
    if (await check().catch(() => false)) return true;
    await new Promise((r) => setTimeout(r, 250));
  }
  return false;
}
