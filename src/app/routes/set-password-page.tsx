import { useState, type FormEvent } from 'react';
import { Link, useLocation, useParams } from 'react-router-dom';
import { Button } from '../../components/ui/button.tsx';
import { TextField } from '../../components/ui/field.tsx';
import { ErrorNotice, Loading } from '../../components/ui/page-state.tsx';
import {
  useCompleteToken,
  useTokenInfo,
} from '../../features/auth/api/account.ts';
import { ApiError } from '../../lib/api-client.ts';

/** Where an invitation or password-reset link lands. */
export default function SetPasswordPage() {
  const { token = '' } = useParams();
  const isInvitation = useLocation().pathname.startsWith('/welcome/');
  const info = useTokenInfo(token);
  const complete = useCompleteToken(
    isInvitation ? 'invitation' : 'password_reset',
  );
  const [password, setPassword] = useState('');
  const [repeat, setRepeat] = useState('');
  const [mismatch, setMismatch] = useState(false);

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    setMismatch(password !== repeat);
    if (password === repeat) complete.mutate({ token, password });
  };
  const error = complete.error instanceof ApiError ? complete.error : null;

  return (
    <div className="flex min-h-screen items-center justify-center bg-lamina-950 px-4">
      <div className="w-full max-w-md rounded-2xl bg-white p-8 shadow-xl">
        <h1 className="text-2xl font-semibold text-lamina-900">
          {isInvitation ? 'Welcome to Lamella' : 'Choose a new password'}
        </h1>
        {info.isPending && <Loading what="your link" />}
        {info.isError && (
          <div className="mt-4">
            <ErrorNotice error={info.error} />
          </div>
        )}
        {complete.isSuccess && (
          <p role="status" className="mt-4 text-sm text-slate-700">
            Your password is set.{' '}
            <Link
              to="/sign-in"
              className="font-semibold text-lamina-700 underline"
            >
              Sign in
            </Link>
          </p>
        )}
        {info.data && !complete.isSuccess && (
          <form onSubmit={handleSubmit} className="mt-6 space-y-4" noValidate>
            <p className="text-sm text-slate-700">
              {info.data.displayName} ({info.data.email})
            </p>
            <TextField
              label="New password"
              type="password"
              autoComplete="new-password"
              value={password}
              onChange={(e) => setPassword(e.target.value)}
              hint="At least 10 characters."
              error={error?.fieldMessage('password')}
            />
            <TextField
              label="Repeat the password"
              type="password"
              autoComplete="new-password"
              value={repeat}
              onChange={(e) => setRepeat(e.target.value)}
              error={mismatch ? 'The two passwords differ.' : undefined}
            />
            {error && error.details.length === 0 && (
              <ErrorNotice error={error} />
            )}
            <Button
              type="submit"
              className="w-full"
              disabled={complete.isPending}
            >
              Set password
            </Button>
          </form>
        )}
      </div>
    </div>
  );
}
