import { useState, type FormEvent } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '../../components/ui/button.tsx';
import { TextField } from '../../components/ui/field.tsx';
import { useRequestPasswordReset } from '../../features/auth/api/account.ts';
import { ApiError } from '../../lib/api-client.ts';

export default function ForgotPasswordPage() {
  const [email, setEmail] = useState('');
  const request = useRequestPasswordReset();
  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    request.mutate(email);
  };
  const error = request.error instanceof ApiError ? request.error : null;
  return (
    <div className="flex min-h-screen items-center justify-center bg-lamina-950 px-4">
      <div className="w-full max-w-md rounded-2xl bg-white p-8 shadow-xl">
        <h1 className="text-2xl font-semibold text-lamina-900">
          Reset your password
        </h1>
        {request.isSuccess ? (
          <p role="status" className="mt-4 text-sm text-slate-700">
            {request.data.message}
          </p>
        ) : (
          <form onSubmit={handleSubmit} className="mt-6 space-y-4" noValidate>
            <TextField
              label="E-mail address"
              type="email"
              autoComplete="email"
              value={email}
              onChange={(e) => setEmail(e.target.value)}
              error={
                error?.fieldMessage('email') ??
                (error?.details.length ? undefined : error?.message)
              }
            />
            <Button
              type="submit"
              className="w-full"
              disabled={request.isPending}
            >
              Send me a link
            </Button>
          </form>
        )}
        <p className="mt-4 text-center text-sm">
          <Link to="/sign-in" className="text-lamina-700 underline">
            Back to sign-in
          </Link>
        </p>
      </div>
    </div>
  );
}
