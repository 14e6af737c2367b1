// The field outbox: what this device keeps for the server, in the order it will be sent, each with its state.
import { useEffect, useState } from 'react';
import { Link } from 'react-router';
import { ProgressBar } from '../../components/progress-bar.tsx';
import { useOnline } from '../../lib/online.ts';
import { discardItem, kick, photoBlob, retryItem, type OutboxItem, type OutboxKind } from '../../lib/outbox.ts';
import { useOutbox } from '../../lib/use-outbox.ts';

const KIND_WORDS: Record<OutboxKind, string> = {
  'structure.create': 'New structure',
  'span.create': 'New span',
  'span.update': 'Span changes',
  'span.submit': 'Submission',
  'photo.upload': 'Photo',
};

const STATE_WORDS: Record<OutboxItem['state'], { words: string; tone: string }> = {
  waiting: { words: 'Waiting for a connection', tone: 'bg-brass-100 text-ink-900 border-brass-300' },
  sending: { words: 'Sending now', tone: 'bg-ink-100 text-ink-900 border-ink-300' },
  failed: { words: 'Refused by the server', tone: 'bg-red-50 text-alarm border-alarm' },
  conflict: { words: 'Changed on the server meanwhile', tone: 'bg-red-50 text-alarm border-alarm' },
};

function KindGlyph({ kind }: { kind: OutboxKind }) {
  // Small line drawings in the product's ink: a pole, a span between two poles, a camera, a tick.
  const common = { stroke: 'currentColor', strokeWidth: 2, fill: 'none', strokeLinecap: 'round' as const };
  return (
    <svg viewBox="0 0 24 24" className="h-7 w-7 shrink-0 text-ink-700" aria-hidden="true">
      {kind === 'structure.create' && <path d="M12 3v18M7 7h10M8 21h8" {...common} />}
      {(kind === 'span.create' || kind === 'span.update') && <path d="M4 5v15M20 5v15M4 8q8 6 16 0" {...common} />}
      {kind === 'span.submit' && <path d="M5 12l4 4 10-10" {...common} />}
      {kind === 'photo.upload' && <path d="M4 8h4l2-2h4l2 2h4v11H4zM12 16a3 3 0 1 0 0-6 3 3 0 0 0 0 6z" {...common} />}
    </svg>
  );
}

function madeAt(iso: string) {
  const d = new Date(iso);
  const mins = Math.round((Date.now() - d.getTime()) / 60_000);
  const ago = mins < 1 ? 'just now' : mins < 60 ? `${mins} min ago` : mins < 48 * 60 ? `${Math.round(mins / 60)} h ago` : `${Math.round(mins / 1440)} days ago`;
  return `${d.toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' })} (${ago})`;
}

function PhotoThumb({ item }: { item: OutboxItem }) {
  const [url, setUrl] = useState<string | null>(null);
  useEffect(() => {
    let u: string | null = null;
    void photoBlob(item).then((b) => {
      if (b) setUrl((u = URL.createObjectURL(b)));
    });
    return () => {
      if (u) URL.revokeObjectURL(u);
    };
  }, [item]);
  return url ? <img src={url} alt="" className="h-20 w-20 shrink-0 rounded-lg object-cover" /> : <div className="h-20 w-20 shrink-0 rounded-lg bg-ink-50" />;
}

function spanLink(item: OutboxItem) {
  const id = item.kind === 'photo.upload' ? item.photo?.spanId : item.touches[0];
  return item.kind.startsWith('span.') || (item.kind === 'photo.upload' && id) ? `/field/spans/${id}/edit` : null;
}

function Row({ item, position, progress }: { item: OutboxItem; position: number; progress?: number }) {
  const [confirming, setConfirming] = useState(false);
  const state = STATE_WORDS[item.state];
  const link = spanLink(item);
  return (
    <li className="relative flex gap-4 pl-10" data-outbox-item={item.kind} data-state={item.state}>
      {/* The order it will be sent in, on a rail down the left edge. */}
      <span className="absolute left-0 top-4 flex h-7 w-7 items-center justify-center rounded-full bg-ink-900 text-sm font-bold text-chalk" aria-label={`Number ${position} in line`}>
        {position}
      </span>
      <div className="card flex flex-1 flex-col gap-3">
        <div className="flex items-start gap-3">
          {item.kind === 'photo.upload' ? <PhotoThumb item={item} /> : <KindGlyph kind={item.kind} />}
          <div className="min-w-0 flex-1 space-y-1">
            <p className="text-sm font-semibold uppercase tracking-wide text-brass-700">{KIND_WORDS[item.kind]}</p>
            <p className="text-lg font-bold leading-snug">{item.label}</p>
            <p className="text-sm text-ink-700">Made {madeAt(item.createdAt)}{item.attempts > 0 ? ` · tried ${item.attempts} time${item.attempts === 1 ? '' : 's'}` : ''}</p>
            {item.photo && (
              <p className="text-sm text-ink-700">
                {item.photo.lat != null && item.photo.lon != null ? `Taken at ${item.photo.lat.toFixed(5)}°, ${item.photo.lon.toFixed(5)}°` : 'No position in the photo'}
                {item.photo.takenAt ? ` · ${item.photo.takenAt.replace('T', ' ')}` : ''}
              </p>
            )}
          </div>
          <span className={`shrink-0 rounded-full border px-3 py-1 text-sm font-semibold ${state.tone}`} data-testid="item-state">{state.words}</span>
        </div>
        {item.state === 'sending' && progress !== undefined && <ProgressBar label="Uploading" value={progress} />}
        {item.error && (
          <p className="rounded-lg bg-red-50 p-2 text-sm text-alarm" role="note">
            {item.error}
          </p>
        )}
        {confirming ? (
          <div className="flex flex-wrap items-center gap-3 rounded-lg border-2 border-alarm p-3" role="alertdialog" aria-label="Discard this entry?">
            <p className="flex-1 font-semibold">Discard it? What was entered offline for it is lost{item.clientId ? ', and anything made on top of it cannot be sent' : ''}.</p>
            <button type="button" className="btn-ghost min-h-12" onClick={() => setConfirming(false)}>Keep it</button>
            <button type="button" className="btn-danger min-h-12" onClick={() => void discardItem(item.id)}>Discard</button>
          </div>
        ) : (
          <div className="flex flex-wrap gap-3">
            {item.state === 'conflict' && link && <Link to={link} className="btn-primary min-h-12">Open and choose what to keep</Link>}
            {item.state !== 'conflict' && link && <Link to={link} className="btn-ghost min-h-12">Open</Link>}
            {(item.state === 'failed' || item.state === 'waiting') && (
              <button type="button" className="btn-ghost min-h-12" onClick={() => void retryItem(item.id)}>
                {item.state === 'failed' ? 'Try again' : 'Send now'}
              </button>
            )}
            {item.state !== 'sending' && (
              <button type="button" className="btn-ghost min-h-12 text-alarm" onClick={() => setConfirming(true)}>
                Discard…
              </button>
            )}
          </div>
        )}
      </div>
    </li>
  );
}

export function FieldOutboxPage({ userId }: { userId: string }) {
  const online = useOnline();
  const outbox = useOutbox();
  const mine = outbox.items.filter((i) => i.userId === userId);
  return (
    <div className="mx-auto max-w-3xl space-y-5 pb-16">
      <header className="space-y-2">
        <p className="text-sm font-semibold uppercase tracking-wide text-brass-700">This device</p>
        <h1 className="page-title">Field outbox</h1>
        <p className="text-ink-700">What you made without a connection, kept on this tablet and sent in this order, each once, when the network is back.</p>
      </header>
      <section className={`flex flex-wrap items-center gap-4 rounded-xl p-4 ${online ? 'bg-ink-900 text-chalk' : 'bg-brass-500 text-ink-900'}`} aria-label="Connection">
        <p className="flex-1 text-lg font-bold" data-testid="outbox-summary">
          {!online
            ? `No connection. ${mine.length ? `${mine.length} waiting; they go out by themselves when the signal returns.` : 'Nothing waiting.'}`
            : outbox.needsSignIn && mine.length
              ? `Your session ended. Sign in again to send the ${mine.length} waiting; nothing is lost.`
              : outbox.sending
                ? `Sending… ${mine.length} left.`
                : mine.length
                  ? `${mine.length} not sent yet.`
                  : 'Everything is sent.'}
        </p>
        {online && outbox.needsSignIn && mine.length > 0 && <Link to="/sign-in?ended=1&next=%2Ffield%2Foutbox" className="btn-accent min-h-12">Sign in again</Link>}
        {online && !outbox.needsSignIn && mine.some((i) => i.state === 'waiting') && (
          <button type="button" className="btn-accent min-h-12" onClick={kick}>Send now</button>
        )}
      </section>
      {!outbox.loaded && <p className="text-ink-700">Reading what this device keeps…</p>}
      {mine.length > 0 && (
        <ol className="space-y-4" aria-label="Waiting to send, in order">
          {mine.map((item, n) => (
            <Row key={item.id} item={item} position={n + 1} progress={outbox.progress[item.id]} />
          ))}
        </ol>
      )}
      <p className="text-sm text-ink-700">
        New records keep a temporary number on this device until the server gives them theirs; the spans and photos made on them follow. Reviews, imports and admin work need the network.
      </p>
    </div>
  );
}
