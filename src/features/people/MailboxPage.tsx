import { useState } from 'react';
import { ErrorNote, formatDate, PageHeader, Spinner, EmptyState } from '@/components/ui';
import { useMailbox } from './api';

/** Messages the local fake mail server caught (development and tests only). */
export function MailboxPage() {
  const mailbox = useMailbox();
  const [openId, setOpenId] = useState<number | null>(null);
  return (
    <>
      <PageHeader title="Mailbox" kicker="Development">
        Every message Tidegauge sent, caught by the local fake mail server. In production, mail goes to the configured SMTP server instead.
      </PageHeader>
      {mailbox.isPending && <Spinner />}
      <ErrorNote error={mailbox.error} />
      {mailbox.data?.length === 0 && <EmptyState title="No messages yet">Invitations, password resets and review notices appear here.</EmptyState>}
      <ul className="space-y-2" data-testid="mailbox">
        {mailbox.data?.map((m) => (
          <li key={m.id} className="card">
            <button className="flex w-full items-baseline justify-between gap-4 px-4 py-3 text-left" onClick={() => setOpenId(openId === m.id ? null : m.id)} aria-expanded={openId === m.id}>
              <span>
                <span className="font-semibold">{m.subject}</span>
                <span className="ml-2 text-sm text-ink-soft">to {m.to.join(', ')}</span>
              </span>
              <span className="text-xs text-ink-faint">{formatDate(m.receivedAt, true)}</span>
            </button>
            {openId === m.id && <MessageBody text={m.text} />}
          </li>
        ))}
      </ul>
    </>
  );
}

/** The text of a message, with its links made clickable (rendered as text, never as markup). */
function MessageBody({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/\S+)/g);
  return (
    <pre className="whitespace-pre-wrap border-t border-hairline px-4 py-3 font-sans text-sm">
      {parts.map((p, i) =>
        /^https?:\/\//.test(p) ? (
          <a key={i} href={p} className="text-trend underline">
            {p}
          </a>
        ) : (
          <span key={i}>{p}</span>
        ),
      )}
    </pre>
  );
}
