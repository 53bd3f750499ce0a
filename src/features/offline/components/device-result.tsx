import { useState } from 'react';
import { Link } from 'react-router-dom';
import { FINDING_KIND_LABELS, FINDING_KINDS } from '../../../../shared/schemas/findings';
import type { ReflectionEvent, ReflectionType } from '../../../../shared/schemas/trace-analysis';
import { Badge, Notice } from '../../../components/ui/notice';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { SelectField, TextAreaField } from '../../../components/ui/field';
import { formatLength, type LengthUnit } from '../../../lib/format';
import { DistanceBlock, placeEvent } from '../../findings/components/where-to-dig';
import { signedRho } from '../../traces/reflection-words';
import { useDevice } from '../device-context';
import type { DecisionItem, UploadItem } from '../outbox-machine';
import { stateWords } from '../outbox-words';

const TYPE_WORDS: Record<ReflectionType, string> = {
  open: 'Open',
  short: 'Short',
  'impedance-rise': 'Impedance rise',
  'impedance-drop': 'Impedance drop',
};

const KIND_FOR_TYPE: Record<ReflectionType, (typeof FINDING_KINDS)[number]> = {
  open: 'open-conductor',
  short: 'short-circuit',
  'impedance-rise': 'high-resistance',
  'impedance-drop': 'water-ingress',
};

/** Whether the server put the events elsewhere than the phone did (or found others). */
function serverDiffers(item: UploadItem): boolean {
  const server = item.result?.events;
  const phone = item.analysis?.events;
  if (!server || !phone) return false;
  return (
    server.length !== phone.length ||
    server.some((s, i) => s.type !== phone[i].type || Math.abs(s.distanceM - phone[i].distanceM) > 0.0015)
  );
}

const atFarEnd = (e: ReflectionEvent, installedLengthM: number) =>
  e.windowEndM >= installedLengthM && e.windowStartM <= installedLengthM;

/** The event shown first: the strongest reflection that is neither an echo nor the run's far end (else the strongest of any). */
function likelyFault(events: ReflectionEvent[], installedLengthM: number): ReflectionEvent | undefined {
  const strongest = (list: ReflectionEvent[]) =>
    list.reduce<ReflectionEvent | undefined>(
      (best, e) => (!best || Math.abs(e.reflectionCoefficient) > Math.abs(best.reflectionCoefficient) ? e : best),
      undefined,
    );
  const primary = events.filter((e) => e.likelyMultipleOf === null);
  return strongest(primary.filter((e) => !atFarEnd(e, installedLengthM))) ?? strongest(primary) ?? strongest(events);
}

function DecideOnDevice({ upload, event }: { upload: UploadItem; event: ReflectionEvent }) {
  const d = useDevice();
  const [kind, setKind] = useState<(typeof FINDING_KINDS)[number]>(KIND_FOR_TYPE[event.type]);
  const [note, setNote] = useState('');
  const decide = (status: 'confirmed' | 'dismissed') => {
    const now = new Date().toISOString();
    const item: DecisionItem = {
      kind: 'decision',
      id: crypto.randomUUID(),
      uploadId: upload.id,
      userId: d.user.id,
      userName: d.user.name,
      createdAt: now,
      state: 'queued',
      attempts: 0,
      lastAttemptAt: null,
      nextAttemptAt: null,
      problem: null,
      sentAt: null,
      event: {
        index: event.index,
        type: event.type,
        distanceM: event.distanceM,
        windowStartM: event.windowStartM,
        windowEndM: event.windowEndM,
      },
      status,
      findingKind: status === 'dismissed' && kind === KIND_FOR_TYPE[event.type] ? 'not-a-fault' : kind,
      note: note.trim() || null,
      target: null,
      result: null,
    };
    void d.enqueue([item]);
  };
  return (
    <form
      className="space-y-3"
      onSubmit={(e) => (e.preventDefault(), decide('confirmed'))}
      aria-label={`Decide event ${event.index + 1} on this phone`}
    >
      <SelectField label="What is it?" value={kind} onChange={(e) => setKind(e.target.value as typeof kind)}>
        {FINDING_KINDS.map((k) => (
          <option key={k} value={k}>
            {FINDING_KIND_LABELS[k]}
          </option>
        ))}
      </SelectField>
      <TextAreaField label="Note (optional)" value={note} onChange={(e) => setNote(e.target.value)} rows={2} maxLength={2000} />
      <div className="grid grid-cols-2 gap-2">
        <Button type="submit" className="min-h-14 text-base">
          Confirm fault
        </Button>
        <Button variant="secondary" className="min-h-14 text-base" onClick={() => decide('dismissed')}>
          Dismiss
        </Button>
      </div>
    </form>
  );
}

function DecisionState({
  item,
  traceId,
  traceLink,
  findingLink,
}: {
  item: DecisionItem;
  traceId: number | null;
  traceLink: (id: number) => string;
  findingLink: (id: number) => string;
}) {
  const verb = item.status === 'confirmed' ? 'Confirmed as a fault' : 'Dismissed';
  if (item.state === 'sent' && item.result) {
    return (
      <p className="rounded-md bg-ok-light px-3 py-2 font-semibold" role="status" data-testid="device-decision">
        {verb}, sent:{' '}
        <Link className="text-teal underline" to={findingLink(item.result.findingId)}>
          finding {item.result.findingId}
        </Link>
        {item.result.alreadyDecided ? ' (it had been decided already)' : ''}
      </p>
    );
  }
  return (
    <p className="rounded-md bg-warn-light px-3 py-2 font-semibold" role="status" data-testid="device-decision">
      {verb} on this phone: {stateWords(item).toLowerCase()}.{item.problem ? ` ${item.problem.message}` : ''}
      {item.state === 'failed' && traceId !== null && (
        <>
          {' '}
          <Link className="text-teal underline" to={traceLink(traceId)}>
            Open trace {traceId}
          </Link>
        </>
      )}
    </p>
  );
}

/**
 * What the phone made of a trace, at once: the distance, the cable-length and
 * dig windows, the route position and every event — marked plainly as not yet
 * on the server until the outbox has sent it.
 */
export function DeviceResult({
  item,
  unit,
  traceLink,
  findingLink,
}: {
  item: UploadItem;
  unit: LengthUnit;
  traceLink: (id: number) => string;
  findingLink: (id: number) => string;
}) {
  const d = useDevice();
  const run = d.field?.runs.find((r) => r.id === item.where.cableRunId);
  const events = item.analysis?.events ?? [];
  const [picked, setPicked] = useState<number | null>(null);
  const selected = events.find(
    (e) => e.index === (picked ?? likelyFault(events, run?.installedLengthM ?? Infinity)?.index ?? -1),
  );
  const decisions = d.mine.filter((i): i is DecisionItem => i.kind === 'decision' && i.uploadId === item.id);
  const decisionFor = (index: number) => decisions.find((x) => x.event.index === index);
  const { where } = item;

  return (
    <div className="space-y-4">
      {item.state === 'sent' && item.result ? (
        <Notice tone="ok" title="Uploaded" className="text-base">
          <p data-testid="device-sent">
            The server has it as{' '}
            <Link className="font-semibold text-teal underline" to={traceLink(item.result.traceId)}>
              trace {item.result.traceId}
            </Link>
            {item.result.alreadyThere ? ' (it had the file already; nothing was stored twice)' : ''}.{' '}
            {serverDiffers(item)
              ? 'The server’s analysis differs from this phone’s (the cable library may have changed): the trace page shows both.'
              : 'Its own analysis, with the library values of now, is on the trace page.'}
          </p>
        </Notice>
      ) : (
        <Notice tone="warn" title="Analysed on this device, not yet uploaded" className="text-base">
          <p data-testid="device-upload-state">
            {stateWords(item)}
            {item.problem ? `: ${item.problem.message}` : '.'} The file and its settings are kept on this phone until the server
            has them.
          </p>
        </Notice>
      )}
      <p className="text-sm text-ink-soft">
        {where.siteName} · {where.cableRunName} · from end {where.end} ({where.endLabel}) · {item.fileName}
      </p>
      {item.deviceError && (
        <Notice tone="danger" title="The engine could not read this file">
          <p>{item.deviceError}</p>
          <p className="mt-1 text-xs">
            It is still sent: the server keeps every file, marked as unreadable, so it can be looked at later.
          </p>
        </Notice>
      )}
      {item.analysis && (
        <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
          {selected ? (
            <Card
              title={`Event ${selected.index + 1}: ${TYPE_WORDS[selected.type]}${run && atFarEnd(selected, run.installedLengthM) ? ' (far end of the run)' : ''}`}
            >
              <DistanceBlock
                distanceM={selected.distanceM}
                windowStartM={selected.windowStartM}
                windowEndM={selected.windowEndM}
                end={where.end}
                endLabel={where.endLabel}
                unit={unit}
                pos={run ? placeEvent(run, where.end, selected) : null}
                storedText={run ? null : 'The route markers of this run are not on this phone.'}
              />
              <p className="mt-2 text-sm text-ink-soft tabular">
                Reflection coefficient {signedRho(selected.reflectionCoefficient, 3)} · round-trip {selected.roundTripNs.toFixed(1)} ns
                {selected.likelyMultipleOf !== null ? ` · probably an echo of event ${selected.likelyMultipleOf + 1}` : ''}
              </p>
              <div className="mt-3">
                {decisionFor(selected.index) ? (
                  <DecisionState
                    item={decisionFor(selected.index)!}
                    traceId={item.result?.traceId ?? null}
                    traceLink={traceLink}
                    findingLink={findingLink}
                  />
                ) : (
                  <DecideOnDevice key={selected.index} upload={item} event={selected} />
                )}
              </div>
            </Card>
          ) : (
            <Notice tone="info" title="No reflection above the noise">
              The engine found no event on this trace. A matched cable with no fault looks like this; so does a trace too short to
              reach the fault.
            </Notice>
          )}
          <Card title={`Events (${events.length})`}>
            <ul className="space-y-2">
              {events.map((e) => {
                const isSel = e.index === selected?.index;
                const decided = decisionFor(e.index);
                return (
                  <li key={e.index} className={`rounded-md border-2 p-2 ${isSel ? 'border-copper' : 'border-rule'}`}>
                    <button
                      type="button"
                      className="flex min-h-11 w-full items-baseline justify-between gap-2 text-left"
                      onClick={() => setPicked(e.index)}
                      aria-pressed={isSel}
                    >
                      <span className="font-semibold">
                        {e.index + 1}. {TYPE_WORDS[e.type]}
                        {run && atFarEnd(e, run.installedLengthM) ? ' · far end' : ''}
                        {e.likelyMultipleOf !== null ? ' · echo' : ''}
                      </span>
                      <span className="text-xl font-bold tabular">{formatLength(e.distanceM, unit)}</span>
                    </button>
                    {decided && (
                      <Badge tone={decided.state === 'sent' ? 'ok' : 'warn'}>
                        {decided.status === 'confirmed' ? 'Confirmed' : 'Dismissed'}
                        {decided.state === 'sent' ? ', sent' : ', not sent yet'}
                      </Badge>
                    )}
                  </li>
                );
              })}
            </ul>
            <p className="mt-3 text-xs text-mist tabular" data-testid="device-engine">
              Engine {item.analysis.engineVersion} on this phone · VF {item.analysis.vf} ±{' '}
              {(item.analysis.vfTolerance * 100).toFixed(1)} %
              {item.sampleCount ? ` · ${item.sampleCount.toLocaleString()} samples` : ''}
              {item.analysedMs !== undefined ? ` · analysed in ${Math.round(item.analysedMs)} ms` : ''}
            </p>
          </Card>
        </div>
      )}
    </div>
  );
}
