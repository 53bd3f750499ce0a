import { useState, type FormEvent } from 'react';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { fieldErrors, SelectField, TextField } from '../../components/ui/field';
import { Notice } from '../../components/ui/notice';
import { formatAge, formatDateTime } from '../../lib/format';
import { useEndOwnSession, useOwnSessions } from '../../features/auth/api/own-sessions';
import { useChangePassword, useUpdateMe } from '../../features/auth/api/update-me';
import { useSession } from '../../features/auth/use-session';

export function AccountPage() {
  const { user } = useSession();
  const updateMe = useUpdateMe();
  const change = useChangePassword();
  const [current, setCurrent] = useState('');
  const [next, setNext] = useState('');
  const errors = fieldErrors(change.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    change.mutate({ currentPassword: current, newPassword: next }, { onSuccess: () => (setCurrent(''), setNext('')) });
  };

  return (
    <>
      <PageHeader title="Your account" subtitle={user.email} />
      {user.mustChangePassword && (
        <Notice tone="warn" title="Choose your own password" className="mb-4">
          You signed in with a temporary password. Set one of your own below.
        </Notice>
      )}
      <div className="grid grid-cols-1 gap-4 md:grid-cols-2">
        <Card title="Units">
          <SelectField
            label="Show lengths in"
            value={user.unitPreference}
            onChange={(e) => updateMe.mutate({ unitPreference: e.target.value as 'm' | 'ft' })}
          >
            <option value="m">metres (m)</option>
            <option value="ft">feet (ft)</option>
          </SelectField>
          <p className="mt-2 text-xs text-mist">Rholog stores every length in metres; this only changes what you see and type.</p>
        </Card>
        <Card title="Password">
          <form onSubmit={submit} className="space-y-3">
            <TextField label="Current password" type="password" autoComplete="current-password" value={current} onChange={(e) => setCurrent(e.target.value)} error={errors.currentPassword} required />
            <TextField label="New password" type="password" autoComplete="new-password" value={next} onChange={(e) => setNext(e.target.value)} error={errors.newPassword} hint="At least 10 characters, hard to guess: a few unrelated words work well. Not your name or e-mail address." required />
            {change.isSuccess && <Notice tone="ok">Password changed. Rholog signed you out everywhere else.</Notice>}
            {change.error && !Object.keys(errors).length && <Notice tone="danger">{change.error.message}</Notice>}
            <Button type="submit" disabled={change.isPending}>
              Change password
            </Button>
          </form>
        </Card>
        <SignedInElsewhere />
      </div>
    </>
  );
}

/** Where the account is signed in (browsers, phones), newest first, with a way to end one left signed in elsewhere. */
function SignedInElsewhere() {
  const sessions = useOwnSessions();
  const end = useEndOwnSession();
  return (
    <Card title="Where you are signed in">
      {sessions.error && <Notice tone="danger">{sessions.error.message}</Notice>}
      {sessions.data && (
        <>
          <ul className="divide-y divide-rule" data-testid="own-sessions">
            {sessions.data.sessions.map((s) => (
              <li key={s.id} className="flex items-center justify-between gap-3 py-2">
                <div className="text-sm">
                  <div className="font-semibold">
                    {s.device ?? 'Unknown browser'}
                    {s.current && <span className="ml-2 text-xs font-normal text-mist">(this one)</span>}
                  </div>
                  <div className="text-xs text-mist">
                    Signed in {s.signedInAt ? formatDateTime(s.signedInAt) : '—'}
                    {s.address ? ` from ${s.address}` : ''} · last used {formatAge(s.lastSeenAt)}
                  </div>
                </div>
                {!s.current && (
                  <Button variant="secondary" disabled={end.isPending} onClick={() => end.mutate(s.id)}>
                    Sign out there
                  </Button>
                )}
              </li>
            ))}
          </ul>
          {end.error && <Notice tone="danger">{end.error.message}</Notice>}
          <p className="mt-2 text-xs text-mist">
            An account keeps at most {sessions.data.cap} sessions: signing in on one more ends the oldest.
          </p>
        </>
      )}
    </Card>
  );
}
export default AccountPage;
