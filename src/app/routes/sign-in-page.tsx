import { useState, type FormEvent } from 'react';
import { Link, Navigate, useNavigate } from 'react-router-dom';
import { Button } from '../../components/ui/button.tsx';
import { TextField } from '../../components/ui/field.tsx';
import { useSession, useSignIn } from '../../features/auth/api/session.ts';
import { ApiError } from '../../lib/api-client.ts';
import { HOME_BY_ROLE } from '../../lib/paths.ts';

export default function SignInPage() {
  const session = useSession();
  const signIn = useSignIn();
  const navigate = useNavigate();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');

  if (session.data)
    return <Navigate to={HOME_BY_ROLE[session.data.user.role]} replace />;

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    signIn.mutate(
      { email, password },
      {
        onSuccess: (s) => {
          void navigate(HOME_BY_ROLE[s.user.role], { replace: true });
        },
      },
    );
  };
  const error = signIn.error instanceof ApiError ? signIn.error : null;

  return (
    <div className="flex min-h-screen items-center justify-center bg-lamina-950 px-4">
      <div className="w-full max-w-md rounded-2xl bg-white p-8 shadow-xl">
        <h1 className="text-3xl font-semibold text-lamina-900">Lamella</h1>
        <p className="mt-1 text-sm text-slate-600">
          Grid versus no-grid image quality, measured from your own rooms&apos;
          raw images.
        </p>
        <form onSubmit={handleSubmit} className="mt-6 space-y-4" noValidate>
          <TextField
            label="E-mail address"
            type="email"
            autoComplete="username"
            required
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            error={error?.fieldMessage('email')}
          />
          <TextField
            label="Password"
            type="password"
            autoComplete="current-password"
            required
            value={password}
            onChange={(e) => setPassword(e.target.value)}
            error={error?.fieldMessage('password')}
          />
          {error && error.details.length === 0 && (
            <p
              role="alert"
              className="rounded-md bg-red-50 p-3 text-sm text-red-800"
            >
              {error.message}
            </p>
          )}
          <Button type="submit" className="w-full" disabled={signIn.isPending}>
            {signIn.isPending ? 'Signing in…' : 'Sign in'}
          </Button>
        </form>
        <p className="mt-4 text-center text-sm">
          <Link to="/forgot-password" className="text-lamina-700 underline">
            Forgot your password?
          </Link>
        </p>
      </div>
    </div>
  );
}
