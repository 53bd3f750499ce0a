import { useState, type FormEvent } from 'react';
import { ROLE_LABELS, ROLES, type Role } from '../../../shared/auth/permissions';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { fieldErrors, SelectField, TextField } from '../../components/ui/field';
import { Badge, ErrorNotice, Loading, Notice } from '../../components/ui/notice';
import { Pager } from '../../components/ui/pager';
import { useSession } from '../../features/auth/use-session';
import { useUsers } from '../../features/users/api/list-users';
import { useCreateUser, useResetUserPassword, useUpdateUser } from '../../features/users/api/save-user';

export function AdminUsersPage() {
  const { user: me } = useSession();
  const [q, setQ] = useState('');
  const [page, setPage] = useState(1);
  const users = useUsers({ q, page });
  const create = useCreateUser();
  const update = useUpdateUser();
  const reset = useResetUserPassword();
  const [form, setForm] = useState({ email: '', name: '', role: 'technician' as Role });
  const [issued, setIssued] = useState<{ email: string; password: string } | null>(null);
  const [leftOpen, setLeftOpen] = useState<{ name: string; count: number } | null>(null);
  const errors = fieldErrors(create.error);

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
      <PageHeader title="Users" subtitle="Create accounts with a temporary password, change roles, deactivate people who have left." />
      {issued && (
        <Notice tone="ok" title="Temporary password" className="mb-4">
          Give <strong>{issued.email}</strong> this password by a safe route; they will be asked to change it:{' '}
          <code className="rounded bg-white px-1 font-mono">{issued.password}</code>
        </Notice>
      )}
      {leftOpen && (
        <Notice tone="warn" title="Open repairs still assigned" className="mb-4">
          {leftOpen.name} is deactivated but still has {leftOpen.count} open repair ticket{leftOpen.count === 1 ? '' : 's'}. A supervisor should reassign{' '}
          {leftOpen.count === 1 ? 'it' : 'them'} on the Tickets page.
        </Notice>
      )}
      <div className="grid gap-4 lg:grid-cols-[2fr_1fr]">
        <Card title="People" className="min-w-0">
          <TextField label="Search by name or e-mail" value={q} onChange={(e) => (setQ(e.target.value), setPage(1))} />
          {users.isPending ? (
            <Loading />
          ) : users.error ? (
            <ErrorNotice error={users.error} />
          ) : (
            <>
              <ul className="mt-3 divide-y divide-rule text-sm">
                {users.data.items.map((u) => (
                  <li key={u.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2">
                    <span className="min-w-48 flex-1">
                      <span className="font-semibold">{u.name}</span> {u.active ? <Badge tone="ok">active</Badge> : <Badge tone="plain">deactivated</Badge>}
                      <span className="block text-xs text-mist">{u.email}</span>
                    </span>
                    <select
                      aria-label={`Role of ${u.name}`}
                      className="min-h-11 rounded border border-rule bg-white px-2"
                      value={u.role}
                      disabled={u.id === me.id}
                      onChange={(e) => update.mutate({ id: u.id, role: e.target.value as Role })}
                    >
                      {ROLES.map((r) => (
                        <option key={r} value={r}>
                          {ROLE_LABELS[r]}
                        </option>
                      ))}
                    </select>
                    <span className="flex gap-1">
                      {u.id !== me.id && (
                        <Button
                          variant="ghost"
                          onClick={() =>
                            update.mutate(
                              { id: u.id, active: !u.active },
                              { onSuccess: (r) => setLeftOpen(!r.active && r.openTicketCount > 0 ? { name: r.name, count: r.openTicketCount } : null) },
                            )
                          }
                        >
                          {u.active ? 'Deactivate' : 'Reactivate'}
                        </Button>
                      )}
                      <Button
                        variant="ghost"
                        onClick={() => reset.mutate(u.id, { onSuccess: (r) => setIssued({ email: r.user.email, password: r.temporaryPassword }) })}
                      >
                        New password
                      </Button>
                    </span>
                  </li>
                ))}
              </ul>
              <Pager page={page} pageSize={users.data.pageSize} total={users.data.total} onPage={setPage} />
            </>
          )}
          {update.error && <ErrorNotice error={update.error} />}
        </Card>
        <Card title="Add a person" className="min-w-0">
          <form onSubmit={submit} className="space-y-3">
            <TextField label="Name" value={form.name} onChange={(e) => setForm({ ...form, name: e.target.value })} error={errors.name} required />
            <TextField label="E-mail" type="email" value={form.email} onChange={(e) => setForm({ ...form, email: e.target.value })} error={errors.email} required />
            <SelectField label="Role" value={form.role} onChange={(e) => setForm({ ...form, role: e.target.value as Role })} error={errors.role}>
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
