import { Fragment, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import type { OutboxItem } from '#shared/schemas/accounts.ts';
import { adminQueries } from './queries.ts';
import { dateTime } from './format.ts';

/** Plain text with its web addresses as links (the invitation and reset links open from here). */
function LinkedText({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <pre className="whitespace-pre-wrap break-words font-sans text-sm">
      {parts.map((p, i) =>
        /^https?:\/\//.test(p) ? (
          <a key={i} href={p} className="font-semibold text-ink-700 underline">{p}</a>
        ) : (
          <Fragment key={i}>{p}</Fragment>
        ),
      )}
    </pre>
  );
}

function MessageView({ m }: { m: OutboxItem }) {
  const [view, setView] = useState<'text' | 'html'>('text');
  return (
    <article aria-label={`Message: ${m.subject}`} className="card space-y-3">
      <header>
        <h2 className="text-lg font-bold">{m.subject}</h2>
        <p className="text-sm text-ink-700">To {m.to} · {dateTime(m.sentAt)}</p>
      </header>
      <div role="tablist" aria-label="Part" className="flex gap-2">
        <button type="button" role="tab" aria-selected={view === 'text'} className={view === 'text' ? 'btn-primary' : 'btn-ghost'} onClick={() => setView('text')}>Plain text</button>
        <button type="button" role="tab" aria-selected={view === 'html'} disabled={!m.html} className={view === 'html' ? 'btn-primary' : 'btn-ghost'} onClick={() => setView('html')}>HTML</button>
      </div>
      {view === 'text' || !m.html ? (
        <LinkedText text={m.text} />
      ) : (
        // Sandboxed with no permissions: no scripts, no forms, no navigation out of the frame.
        <iframe title={`HTML part of ${m.subject}`} sandbox="" srcDoc={m.html} className="h-[28rem] w-full rounded-lg border border-ink-100 bg-white" />
      )}
    </article>
  );
}

export function OutboxPage() {
  const { data, isPending, error } = useQuery(adminQueries.outbox());
  const [selected, setSelected] = useState<number | null>(null);
  const items = data?.items ?? [];
  const current = items.find((m) => m.id === selected) ?? items[0];
  return (
    <section aria-labelledby="outbox-title" className="space-y-4">
      <header>
        <h1 id="outbox-title" className="page-title">Outbox</h1>
        <p className="text-ink-700">
          {data?.via === 'smtp'
            ? 'Mail goes to the configured mail server. These are copies, with the one-time links taken out.'
            : 'No mail server is configured, so mail stays here, in the built-in local catcher. Newest first.'}
        </p>
      </header>
      {error && <p role="alert" className="field-error">{error.message}</p>}
      {isPending ? (
        <p>Loading…</p>
      ) : items.length === 0 ? (
        <p className="card text-ink-700">Nothing sent yet.</p>
      ) : (
        <div className="grid gap-4 lg:grid-cols-[22rem_1fr]">
          <ul aria-label="Messages" className="card divide-y divide-ink-100 p-0">
            {items.map((m) => (
              <li key={m.id}>
                <button
                  type="button"
                  aria-current={current?.id === m.id}
                  onClick={() => setSelected(m.id)}
                  className={`block w-full px-4 py-3 text-left ${current?.id === m.id ? 'bg-brass-100' : 'hover:bg-ink-50'}`}
                >
                  <span className="block font-semibold">{m.subject}</span>
                  <span className="block text-sm text-ink-700">{m.to}</span>
                  <span className="block text-xs text-ink-500">{dateTime(m.sentAt)}</span>
                </button>
              </li>
            ))}
          </ul>
          {current && <MessageView key={current.id} m={current} />}
        </div>
      )}
    </section>
  );
}
