import { useEffect, useRef, useState, type FormEvent } from 'react';
import { ROLE_LABELS, ROLES, type Role } from '../../../shared/auth/permissions';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { CopyButton } from '../../components/ui/copy-button';
import { fieldErrors, SelectField, TextField } from '../../components/ui/field';
import { ErrorNotice, Loading, Notice } from '../../components/ui/notice';
import { Pager } from '../../components/ui/pager';
import { useSession } from '../../features/auth/use-session';
import { useAssignable } from '../../features/tickets/api/list-assignable';
import { useUsers } from '../../features/users/api/list-users';
import { useCreateUser } from '../../features/users/api/save-user';
import { PersonRow } from '../../features/users/components/person-row';
import { countOf } from '../../lib/format';

export function AdminUsersPage() {
  const { user: me } = useSession();
  const [q, setQ] = useState('');
  const [page, setPage] = useState(1);
  const users = useUsers({ q, page });
  const technicians = useAssignable();
  const create = useCreateUser();
  const [form, setForm] = useState({ email: '', name: '', role: 'technician' as Role });
  const [issued, setIssued] = useState<{ email: string; password: string } | null>(null);
  const [left, setLeft] = useState<{ name: string; stillOpen: number; handedTo: string | null } | null>(null);
  const errors = fieldErrors(create.error);
  // The password just issued (or the hand-over just done) is said above the list: on a phone the button pressed is
  // a screen or more below, so the page brings the notice into view and to the keyboard's and reader's attention.
  const said = useRef<HTMLDivElement>(null);
  const issuedCode = useRef<HTMLElement>(null);
  useEffect(() => {
    if (!issued && !left) return;
    said.current?.scrollIntoView?.({ block: 'center' });
    said.current?.focus({ preventScroll: true });
  }, [issued, left]);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate(form, {
      onSuccess: (r) => {
        setIssued({ email: r.user.email, password: r.temporaryPassword });
        setForm({ email: '', name: '', role: 'technician' });
      },
    });
  };

  return (
    <>
      <PageHeader
        title="Users"
        subtitle="Create accounts with a temporary password, change roles, deactivate people who have left."
      />
      <div ref={said} tabIndex={-1} className="scroll-mt-20 outline-none" data-testid="users-said">
        {issued && (
          <Notice tone="ok" title="Temporary password" className="mb-4">
            Give <strong>{issued.email}</strong> this password by a safe route; they will be asked to change it:{' '}
            <span className="mt-2 flex flex-wrap items-center gap-2">
              <code ref={issuedCode} className="rounded bg-white px-2 py-1 font-mono text-base" data-testid="temporary-password">
                {issued.password}
              </code>
              <CopyButton key={issued.password} text={issued.password} target={issuedCode} label="Copy the password" />
            </span>
          </Notice>
        )}
        {left && (
          <Notice tone={left.stillOpen > 0 ? 'warn' : 'ok'} title={`${left.name} is deactivated`} className="mb-4">
            {left.handedTo ? `Their repairs not yet fixed went to ${left.handedTo}. ` : ''}
            {left.stillOpen > 0
              ? `${countOf(left.stillOpen, 'open repair ticket')} still ${left.stillOpen === 1 ? 'names' : 'name'} them: a supervisor reassigns or signs ${left.stillOpen === 1 ? 'it' : 'them'} off on the Tickets page.`
              : 'No open repair names them.'}
          </Notice>
        )}
      </div>
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
        <Card title="People" className="min-w-0">
          <TextField label="Search by name or e-mail" value={q} onChange={(e) => (setQ(e.target.value), setPage(1))} />
          {users.isPending ? (
            <Loading />
          ) : users.error ? (
            <ErrorNotice error={users.error} onRetry={() => void users.refetch()} retrying={users.isFetching} />
          ) : (
            <>
              <ul className="mt-3 divide-y divide-rule text-sm">
                {users.data.items.map((u) => (
                  <PersonRow
                    key={u.id}
                    person={u}
                    isMe={u.id === me.id}
                    technicians={technicians.data ?? []}
                    onPassword={(p) => (setIssued(p), setLeft(null))}
                    onDeactivated={(r) => (setLeft(r), setIssued(null))}
                  />
                ))}
              </ul>
              <Pager page={page} pageSize={users.data.pageSize} total={users.data.total} onPage={setPage} />
            </>
          )}
        </Card>
        {/* On a phone the form comes before the list, which runs to many screens; on a wide screen it stands beside it. */}
        <Card title="Add a person" className="min-w-0 max-lg:order-first">
          <form onSubmit={submit} className="space-y-3">
            <TextField
              label="Name"
              value={form.name}
              onChange={(e) => setForm({ ...form, name: e.target.value })}
              error={errors.name}
              required
            />
            <TextField
              label="E-mail"
              type="email"
              value={form.email}
              onChange={(e) => setForm({ ...form, email: e.target.value })}
              error={errors.email}
              required
            />
            <SelectField
              label="Role"
              value={form.role}
              onChange={(e) => setForm({ ...form, role: e.target.value as Role })}
              error={errors.role}
            >
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </SelectField>
            {create.error && !Object.keys(errors).length && <ErrorNotice error={create.error} />}
            <Button type="submit" disabled={create.isPending}>
              Create account
            </Button>
          </form>
        </Card>
      </div>
    </>
  );
}
export default AdminUsersPage;
