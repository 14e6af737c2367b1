// Registers the service worker and announces a new version; the surveyor reloads when it suits them (never mid-form).
import { useRegisterSW } from 'virtual:pwa-register/react';

export function UpdatePrompt() {
  const {
    needRefresh: [needRefresh, setNeedRefresh],
    updateServiceWorker,
  } = useRegisterSW({
    onRegisteredSW(_url, registration) {
      // A tablet left open all day still hears about a new version: look once an hour while online.
      if (registration) setInterval(() => navigator.onLine && void registration.update().catch(() => undefined), 60 * 60_000);
    },
  });
  if (!needRefresh) return null;
  return (
    <div role="status" aria-live="polite" className="fixed inset-x-0 top-0 z-50 flex justify-center p-2" data-testid="update-prompt">
      <div className="flex flex-wrap items-center gap-3 rounded-xl border-2 border-brass-500 bg-ink-900 px-4 py-3 text-chalk shadow-lg">
        <p className="font-semibold">A new version of Roostline is ready.</p>
        <p className="text-sm text-ink-100">Save what you are doing first; entries waiting to be sent are kept.</p>
        <button type="button" className="btn-accent min-h-11" onClick={() => void updateServiceWorker(true)}>
          Reload now
        </button>
        <button type="button" className="btn min-h-11 border border-ink-500 text-chalk hover:bg-ink-700" onClick={() => setNeedRefresh(false)}>
          Later
        </button>
      </div>
    </div>
  );
}
