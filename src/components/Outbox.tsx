/** The fake outbox: every e-mail the app sent while no SMTP server is configured. */
import type { OutboxMessage } from '../lib/mail';
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { api } from './api';
import { utc } from './format';
import { withQuery } from './query';
import { ErrorText, Loading, Panel } from './ui';

type Message = OutboxMessage;

/** Render the text with its links clickable. */
function Linked({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <>
      {parts.map((p, i) =>
        /^https?:\/\//.test(p) ? (
          <a key={i} href={p} className="break-all">
            {p}
          </a>
        ) : (
          <span key={i}>{p}</span>
        ),
      )}
    </>
  );
}

function Outbox() {
  const q = useQuery({ queryKey: ['outbox'], queryFn: () => api<{ messages: Message[] }>('/api/dev/outbox'), refetchInterval: 5000 });
  const [open, setOpen] = useState<string | null>(null);
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-[18px] font-semibold">Outbox</h1>
        <p className="text-[13px] text-muted">
          No SMTP_URL is set, so e-mail is not sent: each message is written as an <span className="mono">.eml</span> file under{' '}
          <span className="mono">data/outbox/</span> and listed here, newest first.
        </p>
        <p className="text-[13px] text-warn">
          ! For local use only: every project owner can read every message here, password-reset links included. Set SMTP_URL on any shared server.
        </p>
      </div>
      <Panel title="Messages">
        {q.isPending ? (
          <Loading what="messages" />
        ) : q.error ? (
          <ErrorText error={q.error} />
        ) : q.data.messages.length === 0 ? (
          <p className="px-3 py-4 text-muted">The outbox is empty.</p>
        ) : (
          <ul className="divide-y divide-line">
            {q.data.messages.map((m) => {
              const shown = open === m.id || (open === null && m === q.data.messages[0]);
              return (
                <li key={m.id}>
                  <button
                    className="flex w-full cursor-pointer items-baseline gap-3 px-3 py-2 text-left hover:bg-accent-soft"
                    onClick={() => setOpen(shown ? '' : m.id)}
                    aria-expanded={shown}
                  >
                    <span className="mono w-44 shrink-0 text-[12px] whitespace-nowrap text-muted">{utc(m.date)}</span>
                    <span className="mono w-64 shrink-0 truncate text-[12px]">{m.to}</span>
                    <span className="flex-1 truncate font-medium">{m.subject}</span>
                  </button>
                  {shown && (
                    <pre className="mono mx-3 mb-3 overflow-auto rounded border border-line bg-bg p-3 text-[12px] whitespace-pre-wrap">
                      <Linked text={m.text} />
                    </pre>
                  )}
                </li>
              );
            })}
          </ul>
        )}
      </Panel>
    </div>
  );
}

export default withQuery(Outbox);
