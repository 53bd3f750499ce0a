import { useRegisterSW } from 'virtual:pwa-register/react';
import { Button } from '../../../components/ui/button';

/**
 * The service worker's news, in the page's flow above the status line (it
 * covers nothing): the app is ready to work without signal, or a new version
 * was deployed and waits for a reload — never forced, as a form being filled
 * in would be lost.
 */
export function UpdatePrompt() {
  const {
    needRefresh: [needRefresh, setNeedRefresh],
    offlineReady: [offlineReady, setOfflineReady],
    updateServiceWorker,
  } = useRegisterSW();
  if (!needRefresh && !offlineReady) return null;
  return (
    <div
      role="status"
      aria-label="App version"
      className="no-print mb-3 flex flex-wrap items-center gap-3 rounded-md bg-ink px-4 py-2 text-sm text-white"
    >
      <p className="flex-1">
        {needRefresh
          ? 'A new version of Rholog is ready. Reload to use it; anything waiting to send stays on this phone.'
          : 'Rholog is ready to work without signal on this phone.'}
      </p>
      {needRefresh ? (
        <>
          <Button onClick={() => void updateServiceWorker(true)}>Reload now</Button>
          <Button variant="ghost" className="text-white" onClick={() => setNeedRefresh(false)}>
            Later
          </Button>
        </>
      ) : (
        <Button variant="ghost" className="text-white" onClick={() => setOfflineReady(false)}>
          OK
        </Button>
      )}
    </div>
  );
}
