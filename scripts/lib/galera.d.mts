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
