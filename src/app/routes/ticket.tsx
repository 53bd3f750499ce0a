import { useEffect, useRef, useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { FINDING_KIND_LABELS } from '../../../shared/schemas/findings';
import type { CloseoutView, TicketDetail, TicketFindingView } from '../../../shared/schemas/tickets';
import type { TicketStatus } from '../../../shared/tickets/status';
import { Button } from '../../components/ui/button';
import { ConfirmDialog } from '../../components/ui/confirm-dialog';
import { Card, PageHeader } from '../../components/ui/card';
import { TextAreaField, TextField } from '../../components/ui/field';
import { ErrorNotice, Loading, Notice } from '../../components/ui/notice';
import { SafetyCaution } from '../../components/ui/safety-caution';
import { useSession } from '../../features/auth/use-session';
import { MailStatusLine } from '../../features/outbox/components/mail-status';
import { MethodScores } from '../../features/locate/components/method-scores';
import { TicketLocations } from '../../features/locate/components/ticket-locations';
import { useTicket } from '../../features/tickets/api/get-ticket';
import { useCommentOnTicket, useMoveTicket } from '../../features/tickets/api/save-ticket';
import { CloseoutForm } from '../../features/tickets/components/closeout-form';
import { EditTicketForm } from '../../features/tickets/components/edit-ticket-form';
import { PriorityBadge, TicketStatusBadge } from '../../features/tickets/components/ticket-badges';
import { SignOffSummary } from '../../features/tickets/components/sign-off-summary';
import { TicketTimeline } from '../../features/tickets/components/ticket-timeline';
import { onlyReadingOf, ReadingAlone, RouteSentence } from '../../features/findings/components/where-to-dig';
import { formatAge, formatDate, formatDateTime, formatLength, formatLengthRange, formatSignedLength, type LengthUnit } from '../../lib/format';
import { ApiError, describeError } from '../../lib/api-client';
import { useDevice } from '../../features/offline/device-context';
import { paths } from '../paths';
import { Term } from '../../components/ui/term';

/** Steps that cannot be taken back: each asks first. */
const FINAL_MOVES: readonly TicketStatus[] = ['withdrawn', 'signed-off'];

const kindLabel = (k: string) => FINDING_KIND_LABELS[k as keyof typeof FINDING_KIND_LABELS] ?? k;

function FindingCard({ f, t, unit, live }: { f: TicketFindingView; t: TicketDetail; unit: LengthUnit; live: boolean }) {
  const endLabel = f.measuredFrom === 'A' ? t.cableRun.endALabel : t.cableRun.endBLabel;
  return (
    <div className="space-y-1 rounded-md border border-rule p-3">
      <p className="text-xs text-mist">
        {live ? (
          // A gloved thumb's target (44 px tall), named for where it goes: the finding's page with its trace and readings.
          <Link
            className="-ml-1 mr-1 inline-flex min-h-11 items-center rounded-md px-1 text-sm font-semibold text-teal underline underline-offset-2"
            to={paths.finding.to(f.id)}
            data-testid="ticket-finding-link"
          >
            Open finding {f.id}
          </Link>
        ) : (
          // The phone keeps the ticket, not the finding's own page: no link that fails without signal.
          <span data-testid="ticket-finding-saved">Finding {f.id} (its page opens with signal)</span>
        )}{' '}
        · {kindLabel(f.kind)} · confirmed by {f.confirmedBy.name}, {formatDateTime(f.confirmedAt)}
      </p>
      {f.bestLocation ? (
        <ReadingAlone
          distanceM={f.distanceM}
          uncertaintyM={f.uncertaintyM}
          windowStartM={f.windowStartM}
          windowEndM={f.windowEndM}
          end={f.measuredFrom}
          endLabel={endLabel}
          unit={unit}
          pos={f.routePosition}
          storedText={f.routePositionText}
          distanceTestId="ticket-distance"
          routeTestId="ticket-route-position"
          fused={f.bestLocation.distanceFromAM !== null}
          only={onlyReadingOf(f.bestLocation, f.id)}
        />
      ) : (
        <>
          <p className="text-2xl font-bold tabular" data-testid="ticket-distance">
            {formatLength(f.distanceM, unit)}
            <span className="ml-2 text-sm font-normal text-ink-soft">
              along the cable from end {f.measuredFrom} ({endLabel}), ± {formatLength(f.uncertaintyM, unit)} (95 %)
            </span>
          </p>
          <p className="font-semibold text-copper-dark">
            <RouteSentence pos={f.routePosition} storedText={f.routePositionText} unit={unit} testId="ticket-route-position" />
          </p>
          <p className="text-sm text-ink-soft tabular">
            <Term k="cableWindow">Cable-length window</Term>: {formatLengthRange(f.windowStartM, f.windowEndM, unit)} along the cable from end {f.measuredFrom}, slack included
          </p>
        </>
      )}
      {f.note && <p className="text-sm">Note: {f.note}</p>}
    </div>
  );
}

function CloseoutSummary({ c, unit }: { c: CloseoutView; unit: LengthUnit }) {
  return (
    <div className="space-y-2" data-testid="closeout-summary">
      <dl className="grid grid-cols-2 gap-3 text-sm sm:grid-cols-4">
        <div>
          <dt className="text-xs text-mist">Found</dt>
          <dd className="font-semibold tabular">{formatLength(c.foundDistanceM, unit)}</dd>
        </div>
        <div>
          <dt className="text-xs text-mist">Located</dt>
          <dd className="font-semibold tabular">{formatLength(c.locatedDistanceM, unit)}</dd>
        </div>
        <div>
          <dt className="text-xs text-mist">Located − found</dt>
          <dd className="font-semibold tabular" data-testid="closeout-error">
            {formatSignedLength(c.errorM, unit)}
            {c.errorFraction !== null && <span className="ml-1 text-xs font-normal text-mist">({(c.errorFraction * 100).toFixed(1)} %)</span>}
          </dd>
        </div>
        <div>
          <dt className="text-xs text-mist">Implied VF (reading used {c.traceVf.toFixed(3)})</dt>
          <dd className="font-semibold tabular" data-testid="closeout-vf">
            {c.impliedVf?.toFixed(3) ?? '—'}
          </dd>
        </div>
      </dl>
      <p className="text-sm">
        Found {c.method === 'marker' ? `${formatLength(c.offsetM ?? 0, unit)} on the ground past ${c.markerLabel}` : `${formatLength(c.enteredDistanceM ?? 0, unit)} along the cable from end ${c.fromEnd}`} —{' '}
        {kindLabel(c.cause)}. {c.workDone}
      </p>
      <p className="text-xs text-mist">
        Recorded by {c.recordedBy.name}, {formatDateTime(c.recordedAt)}.{' '}
        {c.calibrationId ? `Filed as field calibration ${c.calibrationId} for the planners.` : 'Not filed as a calibration.'}
      </p>
    </div>
  );
}

/** One repair: where to dig, what to do next, the close-out and everything that happened. */
export function TicketPage() {
  const id = Number(useParams().ticketId);
  const { unit, can } = useSession();
  const ticket = useTicket(id);
  const move = useMoveTicket();
  const comment = useCommentOnTicket();
  const [moveComment, setMoveComment] = useState('');
  const [note, setNote] = useState('');
  const [asking, setAsking] = useState<TicketStatus | null>(null);
  const device = useDevice();
  // Without signal, one of the person's open repairs kept on the phone stands in: where to dig is still there.
  const saved = device.field?.tickets?.find((s) => s.id === id);
  const noSignal = !device.online || (ticket.error instanceof ApiError && ticket.error.code === 'offline');
  const savedCopy = !ticket.data && saved && noSignal ? saved : null;
  // Opened without signal, the ticket is asked for again as soon as the signal is back (not on every start).
  const { refetch } = ticket;
  const missing = !ticket.data;
  const wasOnline = useRef(device.online);
  useEffect(() => {
    const back = device.online && !wasOnline.current;
    wasOnline.current = device.online;
    if (back && missing) void refetch();
  }, [device.online, missing, refetch]);
  if (!savedCopy && ticket.isPending) return <Loading what="Loading the ticket" />;
  if (!savedCopy && ticket.error) return <ErrorNotice error={ticket.error} onRetry={() => void ticket.refetch()} retrying={ticket.isFetching} />;
  const t = ticket.data ?? savedCopy!;
  // The copy on the phone is read-only: a step, a comment or a close-out needs the server.
  const live = !savedCopy;
  const go = (to: TicketStatus) =>
    move.mutate({ id: t.id, to, comment: moveComment }, { onSuccess: () => (setMoveComment(''), setAsking(null)) });
  const failing = t.mail.filter((m) => m.status === 'failed' || (m.status === 'queued' && m.attempts > 0));

  return (
    <>
      <PageHeader
        title={`Ticket ${t.id}: ${t.title}`}
        subtitle={`${t.site.name} · ${t.cableRun.name} (${t.cableRun.cableType.name}) · raised by ${t.createdBy.name}, ${formatDateTime(t.createdAt)}`}
        actions={
          live && (
            <Link to={paths.ticketSheet.to(t.id)} className="inline-flex min-h-11 items-center rounded-md border border-rule bg-card px-4 text-sm font-semibold hover:border-ink-soft">
              Crew sheet
            </Link>
          )
        }
      />
      {savedCopy && device.field && (
        <Notice tone="warn" title="No signal: this ticket as saved on this phone" className="mb-4">
          <span data-testid="ticket-saved-copy">
            Saved {formatAge(device.field.savedAt)} ({formatDateTime(device.field.savedAt)}), with where to dig, access and notes as they were then. A step, a
            comment or the close-out needs the signal: this page offers them again when it is back.
          </span>
        </Notice>
      )}
      <div className="mb-4 flex flex-wrap items-center gap-2">
        <TicketStatusBadge status={t.status} />
        <PriorityBadge priority={t.priority} />
        <span className="text-sm text-ink-soft">
          {t.assignee ? `Assigned to ${t.assignee.name}` : 'Nobody assigned'} · {t.dueDate ? `due ${formatDate(t.dueDate)}` : 'no due date'}
        </span>
      </div>
      {(failing.length > 0 || t.mailTrouble) && (
        <Notice tone="danger" title="An e-mail about this ticket has not been delivered" className="mb-4">
          {failing[0] ? `${failing[0].lastError} — ` : ''}Rholog keeps trying; the ticket itself is saved. Tell the people concerned another way if it is urgent.
        </Notice>
      )}
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="min-w-0 space-y-4">
          <Card title="Where to dig">
            <div className="space-y-3">
              <TicketLocations t={t} unit={unit} methods={false} />
              {t.findings.some((f) => f.bestLocation) && <h3 className="pt-2 text-sm font-semibold text-ink-soft">{t.findings.length === 1 ? 'The TDR reading behind it' : 'The TDR readings behind it'}</h3>}
              {t.findings.map((f) => (
                <FindingCard key={f.id} f={f} t={t} unit={unit} live={live} />
              ))}
              {t.accessNotes && (
                <p className="text-sm">
                  <span className="font-semibold">Access: </span>
                  {t.accessNotes}
                </p>
              )}
              {t.notes && (
                <p className="whitespace-pre-wrap text-sm">
                  <span className="font-semibold">Notes: </span>
                  {t.notes}
                </p>
              )}
            </div>
          </Card>
          {/* What the crew found and did comes before the step that accepts it (sign off, reopen). */}
          {t.closeouts.length > 0 && (
            <Card title="Close-out">
              <CloseoutSummary c={t.closeouts[0]} unit={unit} />
              {t.closeouts[0].methodScores && t.closeouts[0].methodScores.length > 0 && (
                <div className="mt-3">
                  <MethodScores scores={t.closeouts[0].methodScores} unit={unit} />
                </div>
              )}
            </Card>
          )}
          {live && (t.can.moves.length > 0 || t.can.closeOut) && (
            <Card title="Next step">
              {t.can.moves.length > 0 && (
                <div className="space-y-3">
                  <TextField label="Comment (optional)" value={moveComment} onChange={(e) => setMoveComment(e.target.value)} />
                  <div className="flex flex-wrap gap-2">
                    {t.can.moves
                      .filter((m) => m.to !== 'withdrawn')
                      .map((m) => (
                        <Button
                          key={m.to}
                          variant={m.to === 'signed-off' || (m.to === 'under-way' && t.status === 'assigned') ? 'primary' : 'secondary'}
                          disabled={move.isPending}
                          onClick={() => (FINAL_MOVES.includes(m.to) ? setAsking(m.to) : go(m.to))}
                        >
                          {m.label}
                          {FINAL_MOVES.includes(m.to) ? '…' : ''}
                        </Button>
                      ))}
                  </div>
                  {t.can.moves.some((m) => m.to === 'withdrawn') && (
                    // Set apart from the everyday steps, so it is never pressed in passing.
                    <div className="border-t border-rule pt-3">
                      <Button variant="secondary" className="border-danger text-danger" disabled={move.isPending} onClick={() => setAsking('withdrawn')}>
                        Withdraw the ticket…
                      </Button>
                    </div>
                  )}
                  {move.error && !asking && <ErrorNotice error={move.error} />}
                  <ConfirmDialog
                    open={asking !== null}
                    title={asking === 'withdrawn' ? `Withdraw ticket ${t.id}?` : `Sign off ticket ${t.id}?`}
                    confirmLabel={asking === 'withdrawn' ? 'Withdraw the ticket' : 'Sign off for good'}
                    tone={asking === 'withdrawn' ? 'danger' : 'primary'}
                    pending={move.isPending}
                    error={move.error ? describeError(move.error) : null}
                    onCancel={() => (setAsking(null), move.reset())}
                    onConfirm={() => asking && go(asking)}
                  >
                    {asking === 'withdrawn' ? (
                      <>
                        <p>The ticket closes without a repair, and a withdrawn ticket cannot be reopened.</p>
                        <p>
                          {t.assignee ? `${t.assignee.name} is told by e-mail and it leaves their list. ` : ''}
                          Its {t.findings.length === 1 ? 'finding stays confirmed and can' : 'findings stay confirmed and can'} go on a new ticket.
                        </p>
                      </>
                    ) : (
                      <>
                        <SignOffSummary t={t} unit={unit} />
                        <p>The repair is accepted as done and the ticket closes. A signed-off ticket cannot be reopened.</p>
                        <p>The close-out and any field calibration it filed stay as recorded.</p>
                      </>
                    )}
                    {moveComment.trim() && <p className="text-sm text-ink-soft">Your comment goes with it: “{moveComment.trim()}”</p>}
                  </ConfirmDialog>
                </div>
              )}
              {t.can.closeOut && (
                <div className={t.can.moves.length ? 'mt-5 border-t border-rule pt-4' : ''}>
                  <h3 className="mb-2 text-lg font-semibold">Close out the repair</h3>
                  <div className="mb-3">
                    <SafetyCaution compact />
                  </div>
                  <CloseoutForm ticket={t} unit={unit} />
                </div>
              )}
            </Card>
          )}
          <Card title="Timeline">
            <TicketTimeline events={t.timeline} />
            {live && t.can.comment && (
              <form
                className="mt-4 space-y-2"
                onSubmit={(e) => {
                  e.preventDefault();
                  comment.mutate({ id: t.id, comment: note }, { onSuccess: () => setNote('') });
                }}
              >
                <TextAreaField label="Add a comment" value={note} onChange={(e) => setNote(e.target.value)} />
                {comment.error && <ErrorNotice error={comment.error} />}
                <Button type="submit" variant="secondary" disabled={!note.trim() || comment.isPending}>
                  Add comment
                </Button>
              </form>
            )}
          </Card>
        </div>
        <div className="space-y-4">
          {live && t.can.edit && can('tickets:manage') && (
            <Card title="Assign and plan">
              <EditTicketForm key={t.updatedAt} ticket={t} />
            </Card>
          )}
          {/* Recipients, delivery state and relay errors are for those who may read the Outbox. */}
          {live && can('outbox:read') && (
            <Card title="E-mail about this ticket">
              {t.mail.length === 0 ? (
                <p className="text-sm text-mist">None sent yet.</p>
              ) : (
                <ul className="space-y-3">
                  {t.mail.map((m) => (
                    <li key={m.id}>
                      <MailStatusLine job={m} />
                    </li>
                  ))}
                </ul>
              )}
            </Card>
          )}
        </div>
      </div>
    </>
  );
}
export default TicketPage;
