import { useState } from 'react';
import { ROLE_LABELS, ROLES, type Role } from '../../../../shared/auth/permissions';
import type { PublicUser } from '../../../../shared/schemas/users';
import { TICKET_STATUS_LABELS } from '../../../../shared/tickets/status';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm-dialog';
import { SelectField } from '../../../components/ui/field';
import { StatusBadge } from '../../../components/ui/status-badge';
import { describeError } from '../../../lib/api-client';
import { countOf } from '../../../lib/format';
import { useOpenRepairs } from '../api/get-open-repairs';
import { useHandOverRepairs, useResetUserPassword, useUpdateUser } from '../api/save-user';

/** What each role may do, in the words an administrator weighs a role change by. */
const ROLE_DUTIES: Record<Role, string> = {
  technician: 'upload traces, confirm or dismiss events on their own traces, and work and close out the repairs given to them',
  supervisor: 'do all a technician does, decide any event, raise, assign and withdraw repair tickets, edit sites and read the dashboard',
  planner: 'edit sites and the cable library, review field calibrations and read the dashboard, but not upload traces or work repairs',
  admin: 'do everything, including managing people, their roles and passwords, and reading the outbox',
};

type Asking = { what: 'role'; role: Role } | { what: 'deactivate' } | { what: 'password' } | null;

/**
 * One person on the Users page, with the changes an administrator can make.
 * Each change that takes something away, or cannot be taken back, asks first
 * and says what it will do.
 */
export function PersonRow({
  person,
  isMe,
  technicians,
  onPassword,
  onDeactivated,
}: {
  person: PublicUser;
  isMe: boolean;
  /** Active technicians who could take this person's repairs over. */
  technicians: Array<{ id: number; name: string }>;
  onPassword: (issued: { email: string; password: string }) => void;
  onDeactivated: (result: { name: string; stillOpen: number; handedTo: string | null }) => void;
}) {
  const [asking, setAsking] = useState<Asking>(null);
  const [handTo, setHandTo] = useState<string>('');
  const update = useUpdateUser();
  const reset = useResetUserPassword();
  const handOver = useHandOverRepairs();
  const repairs = useOpenRepairs(person.id, asking?.what === 'deactivate');
  const movable = repairs.data?.tickets.filter((t) => t.movable) ?? [];
  const others = technicians.filter((t) => t.id !== person.id);
  const handToName = others.find((t) => String(t.id) === handTo)?.name ?? null;
  const pending = update.isPending || reset.isPending || handOver.isPending;
  const failure = update.error ?? reset.error ?? handOver.error;
  const close = () => {
    setAsking(null);
    setHandTo('');
    update.reset();
    reset.reset();
    handOver.reset();
  };

  const confirm = async () => {
    if (!asking) return;
    try {
      if (asking.what === 'role') await update.mutateAsync({ id: person.id, role: asking.role });
      if (asking.what === 'password') onPassword(await reset.mutateAsync(person.id).then((r) => ({ email: r.user.email, password: r.temporaryPassword })));
      if (asking.what === 'deactivate') {
        const to = handTo ? await handOver.mutateAsync({ id: person.id, toUserId: Number(handTo) }) : null;
        const r = await update.mutateAsync({ id: person.id, active: false });
        onDeactivated({ name: r.name, stillOpen: r.openTicketCount, handedTo: to && to.moved.length ? to.to.name : null });
      }
      close();
    } catch {
      // The error stays in the dialog for the administrator to read.
    }
  };

  return (
    <li className="flex flex-wrap items-center gap-x-3 gap-y-2 py-3">
      <span className="min-w-48 flex-1">
        <span className="font-semibold">{person.name}</span>{' '}
        <StatusBadge kind="person" status={person.active ? 'active' : 'deactivated'} />
        <span className="block text-xs text-mist">{person.email}</span>
      </span>
      {/* A visible word beside the dropdown (its spoken name adds whose role it is); wide enough for the longest role and the arrow. */}
      <label className="flex items-center gap-2 text-sm">
        <span className="font-semibold text-ink-soft">Role</span>
        <select
          aria-label={`Role of ${person.name}`}
          className="min-h-11 min-w-48 rounded-md border border-rule bg-white pr-8 pl-2 text-base"
          value={person.role}
          disabled={isMe}
          title={isMe ? 'Another administrator changes your role' : undefined}
          onChange={(e) => setAsking({ what: 'role', role: e.target.value as Role })}
        >
          {ROLES.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </select>
      </label>
      <span className="flex flex-wrap gap-1">
        {!isMe &&
          (person.active ? (
            <Button variant="ghost" onClick={() => setAsking({ what: 'deactivate' })}>
              Deactivate…
            </Button>
          ) : (
            <Button variant="ghost" disabled={pending} onClick={() => update.mutate({ id: person.id, active: true })}>
              Reactivate
            </Button>
          ))}
        {/* Your own password is changed on the Account page, knowing the current one. */}
        {!isMe && person.active && (
          <Button variant="ghost" onClick={() => setAsking({ what: 'password' })}>
            New password…
          </Button>
        )}
      </span>

      <ConfirmDialog
        open={asking?.what === 'role'}
        title={asking?.what === 'role' ? `Make ${person.name} ${article(ROLE_LABELS[asking.role])}?` : ''}
        confirmLabel={asking?.what === 'role' ? `Make them ${article(ROLE_LABELS[asking.role])}` : 'Change the role'}
        tone="primary"
        pending={pending}
        error={failure ? describeError(failure) : null}
        onCancel={close}
        onConfirm={confirm}
      >
        {asking?.what === 'role' && (
          <>
            <p>
              As {article(ROLE_LABELS[asking.role])}, {person.name} can {ROLE_DUTIES[asking.role]}.
            </p>
            <p>
              It applies from their next click: anything only {article(ROLE_LABELS[person.role])} may do stops at once
              {person.role === 'technician' && asking.role !== 'technician'
                ? '; the repairs given to them and not yet fixed go back to the supervisors, unassigned, for someone else to take on'
                : ''}
              .
            </p>
          </>
        )}
      </ConfirmDialog>

      <ConfirmDialog
        open={asking?.what === 'password'}
        title={`Give ${person.name} a new temporary password?`}
        confirmLabel="Replace the password"
        pending={pending}
        error={failure ? describeError(failure) : null}
        onCancel={close}
        onConfirm={confirm}
      >
        <p>Their current password stops working now, and they are signed out on every device.</p>
        <p>You will see the temporary password once, to pass on by a safe route; they choose their own at the next sign-in.</p>
      </ConfirmDialog>

      <ConfirmDialog
        open={asking?.what === 'deactivate'}
        title={`Deactivate ${person.name}?`}
        confirmLabel={handTo ? 'Hand over and deactivate' : 'Deactivate'}
        pending={pending}
        confirmDisabled={repairs.isPending}
        error={failure ? describeError(failure) : null}
        onCancel={close}
        onConfirm={confirm}
      >
        <p>They are signed out on every device at once and can no longer sign in. Their name stays on everything they recorded; you can reactivate them later.</p>
        {repairs.isPending ? (
          <p className="text-sm text-mist">Looking for their open repairs…</p>
        ) : repairs.error ? (
          <p className="text-sm text-danger">{describeError(repairs.error)}</p>
        ) : repairs.data.tickets.length === 0 ? (
          <p>They have no open repairs.</p>
        ) : (
          <div className="space-y-2 rounded-md border border-rule p-3" data-testid="open-repairs">
            <p className="font-semibold">They still have {countOf(repairs.data.tickets.length, 'open repair')}:</p>
            <ul className="list-disc space-y-1 pl-5 text-sm" data-testid="repair-fates">
              {repairs.data.tickets.map((t) => (
                <li key={t.id}>
                  Ticket {t.id}: {t.title} ({TICKET_STATUS_LABELS[t.status]}){' '}
                  <span className={t.movable && handToName ? 'font-semibold text-ink' : 'text-ink-soft'}>— {repairFate(t.movable, person.name, handToName)}</span>
                </li>
              ))}
            </ul>
            {movable.length > 0 &&
              (others.length > 0 ? (
                <SelectField
                  label={
                    movable.length === repairs.data.tickets.length
                      ? `Hand ${movable.length === 1 ? 'it' : 'them'} to`
                      : `Hand the ${movable.length === 1 ? 'one' : movable.length} not yet fixed to`
                  }
                  value={handTo}
                  onChange={(e) => setHandTo(e.target.value)}
                  hint={
                    handTo
                      ? `${movable.length === 1 ? 'It goes' : 'Each goes'} back to “Assigned” with the new person, who is e-mailed.`
                      : 'Left with them, a supervisor has to reassign each one on its ticket page.'
                  }
                >
                  <option value="">Nobody yet (leave with {person.name})</option>
                  {others.map((t) => (
                    <option key={t.id} value={t.id}>
                      {t.name}
                    </option>
                  ))}
                </SelectField>
              ) : (
                <p className="text-sm">No other active technician can take them; a supervisor reassigns them later.</p>
              ))}
          </div>
        )}
      </ConfirmDialog>
    </li>
  );
}

/**
 * What deactivating does to one open repair: one not yet fixed moves to the
 * chosen person (or waits for a supervisor); a fixed one keeps its close-out's
 * author and waits for a supervisor's sign-off, so it never moves.
 */
export function repairFate(movable: boolean, from: string, handTo: string | null): string {
  if (!movable) return `stays with ${from}: it is fixed and only waits for a supervisor's sign-off`;
  return handTo ? `moves to ${handTo}, back to “Assigned”` : `stays with ${from} until a supervisor reassigns it`;
}

/** A role in a sentence: "a supervisor", "an administrator". */
function article(role: string): string {
  const word = role.toLowerCase();
  return `${/^[aeiou]/.test(word) ? 'an' : 'a'} ${word}`;
}
