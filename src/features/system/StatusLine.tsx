import { useHealth } from './api';

/** The footer status line: server and database reachability, read from /api/v1/health (versions: administrators only, as the server answers them). */
export function StatusLine() {
  const health = useHealth();
  let tone = 'bg-hairline-strong';
  let text = 'Checking the server…';
  if (health.isError) {
    tone = 'bg-alert';
    text = 'The server is not answering.';
  } else if (health.data) {
    if (health.data.db.ok) {
      tone = 'bg-ok';
      const versions = [health.data.db.version ? `MariaDB ${health.data.db.version.split('-')[0]}` : '', health.data.version ? `Tidegauge ${health.data.version}` : ''].filter(Boolean);
      text = ['Server and database online', ...versions].join(' · ');
    } else {
      tone = 'bg-alert';
      text = 'Database unreachable: reading and saving will fail until it is back.';
    }
  }
  return (
    <div role="status" aria-live="polite" data-testid="health-status" data-state={health.data?.db.ok ? 'ok' : health.data ? 'down' : 'unknown'} className="flex items-center gap-2 text-xs text-ink-soft">
      <span className={`inline-block h-2 w-2 rounded-full ${tone}`} aria-hidden />
      <span>{text}</span>
    </div>
  );
}
