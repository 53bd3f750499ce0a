import { Link } from 'react-router-dom';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { Notice } from '../../components/ui/notice';
import { useSession } from '../../features/auth/use-session';
import { OutboxList } from '../../features/offline/components/outbox-list';
import { useDevice } from '../../features/offline/device-context';
import { countOf, formatAge, formatDateTime } from '../../lib/format';
import { paths } from '../paths';

/** What this phone keeps for working without signal, and what waits on it to be sent. */
export function DevicePage() {
  const { can } = useSession();
  const d = useDevice();
  const sentRecently = d.mine
    .filter((i) => i.state === 'sent')
    .slice(-10)
    .reverse();
  const owners = [...new Set(d.others.map((i) => i.userName))];
  const links = {
    viewerId: d.user.id,
    traceLink: paths.trace.to,
    findingLink: paths.finding.to,
    openLink: (i: { kind: string; id: string }) => (i.kind === 'upload' ? paths.deviceAnalyse.to(i.id) : null),
  };

  return (
    <>
      <PageHeader
        title="On this phone"
        subtitle="Traces analysed here wait on the phone until the server has them; the field data lets you work without signal."
        actions={
          <Link
            className="inline-flex min-h-11 items-center rounded-md bg-copper px-4 text-sm font-semibold text-white"
            to={paths.deviceAnalyse.to()}
          >
            Analyse a trace on this phone
          </Link>
        }
      />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="space-y-4">
          <Card
            title={`Waiting to send (${d.waiting.length})`}
            actions={
              <Button
                variant="secondary"
                disabled={!d.online || d.syncing || !d.waiting.length}
                onClick={() => void d.sync(true)}
              >
                {d.syncing ? 'Sending…' : 'Send now'}
              </Button>
            }
          >
            {!d.online && d.waiting.length > 0 && (
              <p className="mb-2 text-sm text-ink-soft">Offline: they are sent by themselves when the network comes back.</p>
            )}
            <OutboxList
              items={d.waiting}
              all={d.mine}
              empty="Nothing is waiting: everything made on this phone has reached Rholog."
              actions={{ ...links, retry: (id) => void d.retry(id), remove: (id) => void d.remove(id), canSave: true }}
            />
          </Card>
          {sentRecently.length > 0 && (
            <Card title="Sent from this phone">
              <OutboxList
                items={sentRecently}
                all={d.mine}
                empty=""
                actions={{ ...links, remove: (id) => void d.remove(id), canSave: false }}
              />
            </Card>
          )}
          {d.others.length > 0 && (
            <Card title="Kept for other accounts">
              <Notice tone="warn" className="mb-3">
                {countOf(d.others.length, 'item')} made on this phone by {owners.join(', ')}{' '}
                {d.others.length === 1 ? 'has' : 'have'} not been sent. Only the person who made an item can send it, after
                signing in here; if that account can no longer sign in, an administrator can save the files and upload them.
              </Notice>
              {can('users:manage') && (
                <OutboxList
                  items={d.others}
                  all={d.others}
                  empty=""
                  actions={{ ...links, openLink: () => null, remove: (id) => void d.remove(id), canSave: true }}
                />
              )}
            </Card>
          )}
        </div>
        <div className="space-y-4">
          <Card title="Sync">
            <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
              <dt className="text-mist">Network</dt>
              <dd className="font-semibold">{d.online ? 'Online' : 'Offline'}</dd>
              <dt className="text-mist">Last sync</dt>
              <dd data-testid="device-last-sync">
                {d.last
                  ? `${formatDateTime(d.last.at)} (${formatAge(d.last.at)}), ${d.last.problem ? 'stopped' : `${countOf(d.last.sent, 'item')} sent`}`
                  : 'Nothing sent from this phone yet'}
              </dd>
            </dl>
            {d.last?.problem && (
              <Notice tone="danger" title="The last sync did not finish" className="mt-3">
                <p>{d.last.problem.message}</p>
              </Notice>
            )}
          </Card>
          {d.fieldUser && (
            <Card
              title="Field data on this phone"
              actions={
                <Button variant="secondary" disabled={!d.online || d.fieldRefreshing} onClick={() => void d.refreshField()}>
                  {d.fieldRefreshing ? 'Refreshing…' : 'Refresh now'}
                </Button>
              }
            >
              {d.field ? (
                <p className="text-sm" data-testid="field-data-age">
                  Saved {formatAge(d.field.savedAt)} ({formatDateTime(d.field.savedAt)}): {countOf(d.field.sites.length, 'site')},{' '}
                  {countOf(d.field.runs.length, 'cable run')} with their route markers,{' '}
                  {countOf(d.field.cables.length, 'cable type')} of the library.
                </p>
              ) : (
                <p className="text-sm text-mist">Not saved yet: it is fetched when the phone is online.</p>
              )}
              {d.fieldError && <p className="mt-2 text-sm font-semibold text-danger">Could not refresh: {d.fieldError}</p>}
              <p className="mt-2 text-xs text-mist">
                Kept for your account only, and removed from the phone when you sign out. Refreshed by itself when older than 10
                minutes and online.
              </p>
            </Card>
          )}
        </div>
      </div>
    </>
  );
}
export default DevicePage;
