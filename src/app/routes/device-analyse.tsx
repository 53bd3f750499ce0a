import { useLocation, useSearchParams } from 'react-router-dom';
import { Button } from '../../components/ui/button';
import { PageHeader } from '../../components/ui/card';
import { Notice } from '../../components/ui/notice';
import { SafetyCaution } from '../../components/ui/safety-caution';
import { useSession } from '../../features/auth/use-session';
import { DeviceAnalyseForm } from '../../features/offline/components/device-analyse-form';
import { DeviceResult } from '../../features/offline/components/device-result';
import { useDevice } from '../../features/offline/device-context';
import { paths } from '../paths';

/** Analyse a trace on the phone, with or without signal; the result shows at once and the file waits in the outbox. */
export function DeviceAnalysePage() {
  const { unit } = useSession();
  const d = useDevice();
  const [params, setParams] = useSearchParams();
  const id = params.get('item');
  const item = id ? d.mine.find((i) => i.id === id && i.kind === 'upload') : undefined;
  // Where the trace was taken, and its file, as chosen on the upload page before the signal went.
  const carried = (useLocation().state as { file?: unknown } | null)?.file;
  const end = params.get('end');
  const initial: { siteId?: string; runId?: string; end?: 'A' | 'B'; file?: File } = {
    siteId: params.get('site') ?? undefined,
    runId: params.get('run') ?? undefined,
    end: end === 'A' || end === 'B' ? end : undefined,
    file: carried instanceof File ? carried : undefined,
  };

  return (
    <>
      <PageHeader
        title="Analyse on this phone"
        subtitle={
          d.online
            ? 'The trace is read here at once and sent to Rholog straight after.'
            : 'No signal needed: the trace is read here and sent when the network comes back.'
        }
        actions={
          item && (
            <Button variant="secondary" onClick={() => setParams({})}>
              Analyse another trace
            </Button>
          )
        }
      />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="space-y-4">
          {id && !item && (
            <Notice tone="info" title="That trace is no longer on this phone">
              It was removed from the phone, or belongs to another account.
            </Notice>
          )}
          {item?.kind === 'upload' ? (
            <DeviceResult item={item} unit={unit} traceLink={paths.trace.to} findingLink={paths.finding.to} />
          ) : (
            <DeviceAnalyseForm unit={unit} initial={initial} onAnalysed={(itemId) => setParams({ item: itemId })} />
          )}
        </div>
        <div className="order-first space-y-4 lg:order-none">
          <SafetyCaution compact />
        </div>
      </div>
    </>
  );
}
export default DeviceAnalysePage;
