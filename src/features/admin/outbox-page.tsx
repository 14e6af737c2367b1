import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import type { OutboxItem } from '#shared/schemas/accounts.ts';
import { adminQueries } from './queries.ts';
import { dateTime } from './format.ts';
import { date } from '../../lib/format.ts';

/** What a sent message is for, read from the one-time link it carries, so the admin acts on it without opening it. */
export function mailPurpose(text: string): { label: string; action: string; href: string } | { label: string; action: null; href: null } {
  const link = text.match(/https?:\/\/[^\s<>"]+/)?.[0] ?? null;
  if (link && /\/accept-invitation\?/.test(link)) return { label: 'Invitation', action: 'Open the invitation link', href: link };
  if (link && /\/reset-password\?/.test(link)) return { label: 'Password reset', action: 'Open the reset link', href: link };
  return { label: 'Notice', action: null, href: null };
}

function Letter({ m }: { m: OutboxItem }) {
  const [open, setOpen] = useState(false);
  const [formatted, setFormatted] = useState(false);
  const purpose = mailPurpose(m.text);
  return (
    <li>
      <article aria-label={`Message: ${m.subject}`} className="rounded-xl border-l-4 border-brass-500 bg-white p-4 shadow-sm">
        <div className="flex flex-wrap items-start justify-between gap-3">
          <div className="min-w-0">
            <p className="text-xs font-semibold uppercase tracking-wide text-brass-700">{purpose.label}</p>
            <h3 className="text-lg font-bold text-ink-900">{m.subject}</h3>
            <p className="text-sm text-ink-700">
              To <span className="font-semibold">{m.to}</span> · {dateTime(m.sentAt)}
            </p>
          </div>
          {purpose.href && (
            <a href={purpose.href} className="btn-accent shrink-0">{purpose.action}</a>
          )}
        </div>
        <div className="mt-3 flex flex-wrap gap-2">
          <button type="button" className="btn-ghost" aria-expanded={open} onClick={() => setOpen((o) => !o)}>
            {open ? 'Hide the message' : 'Read the message'}
          </button>
          {open && m.html && (
            <button type="button" className="btn-ghost" aria-expanded={formatted} onClick={() => setFormatted((f) => !f)}>
              {formatted ? 'Show the words only' : 'Show it as the recipient sees it'}
            </button>
          )}
        </div>
        {open &&
          (formatted && m.html ? (
            // Sandboxed with no permissions: no scripts, no forms, no navigation out of the frame.
            <iframe title={`As ${m.to} sees “${m.subject}”`} sandbox="" srcDoc={m.html} className="mt-3 h-[28rem] w-full rounded-lg border border-ink-100 bg-white" />
          ) : (
            <p className="mt-3 whitespace-pre-wrap break-words rounded-lg bg-chalk p-3 text-sm text-ink-900">{m.text}</p>
          ))}
      </article>
    </li>
  );
}

/**
 * Mail Roostline sent: filed by day, newest first, each message a card that leads with what it is for and, for
 * invitations and resets, the link to act on; the words and the formatted version open on request.
 */
export function OutboxPage() {
  const { data, isPending, error } = useQuery(adminQueries.outbox());
  const items = data?.items ?? [];
  const days: { day: string; items: OutboxItem[] }[] = [];
  for (const m of items) {
    const day = date(m.sentAt);
    const last = days.at(-1);
    if (last && last.day === day) last.items.push(m);
    else days.push({ day, items: [m] });
  }
  return (
    <section aria-labelledby="outbox-title" className="mx-auto max-w-3xl space-y-4">
      <header>
        <h1 id="outbox-title" className="page-title">Outbox</h1>
        <p className="text-ink-700">
          {data?.via === 'smtp'
            ? 'Mail goes to the configured mail server. These are copies, with the one-time links taken out.'
            : 'No mail server is configured, so mail Roostline sends is kept here instead of leaving the machine. Newest first.'}
        </p>
      </header>
      {error && <p role="alert" className="field-error">{error.message}</p>}
      {isPending ? (
        <p>Loading…</p>
      ) : items.length === 0 ? (
        <p className="card text-ink-700">Nothing sent yet.</p>
      ) : (
        days.map((d) => (
          <section key={d.day} aria-label={`Sent on ${d.day}`} className="space-y-3">
            <h2 className="text-sm font-semibold text-ink-700">{d.day}</h2>
            <ul className="space-y-3">
              {d.items.map((m) => <Letter key={m.id} m={m} />)}
            </ul>
          </section>
        ))
      )}
    </section>
  );
}
