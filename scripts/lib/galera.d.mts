// Types of galera.mjs for the TypeScript tests.
import type { ChildProcess } from 'node:child_process';

export interface NodePorts {
  port: number;
  gcomm: number;
  sst: number;
  ist: number;
}

export interface GaleraNode extends NodePorts {
  name: string;
  home: string;
  datadir: string;
  socket: string;
  cnf: string;
  logFile: string;
  child: ChildProcess | null;
}

export const CLUSTER_PORTS: {
  nodes: NodePorts[];
  dbFronts: number[];
  apps: number[];
  web: number;
  stats: number;
  fakeSmtp: number;
};

export const CHECK_USER: string;

export function resetDir(dir: string): void;

export class GaleraCluster {
  constructor(options: { dir: string; nodes: NodePorts[]; name?: string; suspectTimeout?: string; quiet?: boolean });
  readonly dir: string;
  readonly nodes: GaleraNode[];
  sql(i: number, statement: string): Promise<string[][]>;
  status(i: number): Promise<Record<string, string>>;
  startNode(i: number, options?: { bootstrap?: boolean; timeoutMs?: number }): Promise<{ ms: number; transfer: 'SST' | 'IST' | 'none' }>;
  tail(i: number, lines?: number): string;
  start(): Promise<void>;
  stopNode(i: number, timeoutMs?: number): Promise<void>;
  killNode(i: number): Promise<void>;
  stop(): Promise<void>;
  killAll(): void;
}

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
