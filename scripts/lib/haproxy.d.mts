// Types of haproxy.mjs for the TypeScript tests.

export function haproxyConfig(options: {
  dir: string;
  nodes: { port: number; name: string }[];
  dbFronts: { port: number; order: number[] }[];
  apps?: { port: number }[];
  web?: number;
  stats: number;
}): string;

export interface Haproxy {
  pid: number | undefined;
  servers(): Promise<{ proxy: string; server: string; status: string }[]>;
  waitFor(proxy: string, server: string, status: string, timeoutMs?: number): Promise<void>;
  stop(): Promise<void>;
  kill(): void;
}

export function startHaproxy(options: { dir: string; config: string; stats: number }): Promise<Haproxy>;
