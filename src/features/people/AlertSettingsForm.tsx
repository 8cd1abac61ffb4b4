import { useAnnounce } from '@/components/Announcer';
import { ErrorNote, Spinner } from '@/components/ui';
import { useAlertSettings, useUpdateAlertSettings } from './api';

/** The Profile page's release alerts: one mail per load when new vintages move the gaps one follows. */
export function AlertSettingsForm() {
  const settings = useAlertSettings();
  const update = useUpdateAlertSettings();
  const announce = useAnnounce();
  return (
    <section className="mt-10 space-y-3" aria-labelledby="alerts-heading">
      <h2 id="alerts-heading" className="font-heading text-lg font-bold">
        Release alerts
      </h2>
      <p className="max-w-2xl text-sm text-ink-soft">
        When new vintages land (a load, a history load or a feed), Tidegauge mails you once per load if your studies follow the latest vintage, or your boards or exhibits draw on the series: for each
        study, the last gap estimate before and after, and the largest revision of the gap in the last two years.
      </p>
      {settings.isPending ? (
        <Spinner />
      ) : settings.data ? (
        <label className="flex items-center gap-2 text-sm">
          <input
            type="checkbox"
            className="h-4 w-4"
            data-testid="release-alerts"
            checked={settings.data.releaseAlerts}
            disabled={update.isPending}
            onChange={(e) => update.mutate({ releaseAlerts: e.target.checked }, { onSuccess: (s) => announce(s.releaseAlerts ? 'Release alerts are on.' : 'Release alerts are off.') })}
          />
          Mail me when new data move the gaps I follow
        </label>
      ) : null}
      <ErrorNote error={settings.error ?? update.error} />
    </section>
  );
}
