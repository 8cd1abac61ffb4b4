import { useQuery } from '@tanstack/react-query';

export interface Health {
  status: 'ok' | 'unavailable';
  /** The software's version: present for signed-in administrators only. */
  version?: string;
  /** `version`: the database's, for signed-in administrators only. */
  db: { ok: boolean; version?: string };
}

/** Reads /health; a 503 still carries the body, so it is returned rather than thrown. */
export function useHealth() {
  return useQuery({
    queryKey: ['health'],
    queryFn: async (): Promise<Health> => {
      const res = await fetch('/api/v1/health', { headers: { Accept: 'application/json' } });
      return (await res.json()) as Health;
    },
    refetchInterval: 30_000,
    retry: false,
  });
}
