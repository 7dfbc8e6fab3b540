import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useSearchParams } from 'react-router';
import { passwordResetConfirmSchema, type PasswordResetConfirmInput } from '../../../shared/schemas/auth';
import { Button } from '../../components/ui/Button';
import { Notice } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { ApiError, applyFieldErrors } from '../../lib/api';
import { paths } from '../../lib/navigation';
import { useConfirmPasswordReset } from './api';
import { AuthLayout } from './AuthLayout';

/** "Set a new password": the page the mailed link opens (`?token=…`). */
export default function ResetPasswordPage() {
  const [search] = useSearchParams();
  const token = search.get('token') ?? '';
  const confirm = useConfirmPasswordReset();
  const form = useForm<PasswordResetConfirmInput>({ resolver: zodResolver(passwordResetConfirmSchema), values: { token, password: '' } });
  const onSubmit = form.handleSubmit((input) => confirm.mutate(input, { onError: (error) => applyFieldErrors(error, form.setError) }));
  // A link that is unknown, used or expired: the way on is a new link, not another password.
  const deadLink = confirm.error instanceof ApiError && Boolean(confirm.error.fields?.token);
  const newLink = (
    <Link to={paths.forgotPassword} className="flex min-h-11 items-center justify-center rounded-md bg-copper-600 px-4 font-semibold text-white hover:bg-copper-700">
      Ask for a new link
    </Link>
  );

  if (confirm.isSuccess) {
    return (
      <AuthLayout title="Your new password is set">
        <div className="flex flex-col gap-4">
          <Notice tone="good">Your password has changed, and every other place where you were signed in has been signed out.</Notice>
          <Link to={paths.signIn} className="flex min-h-11 items-center justify-center rounded-md bg-copper-600 px-4 font-semibold text-white hover:bg-copper-700">Sign in with the new password</Link>
        </div>
      </AuthLayout>
    );
  }
  return (
    <AuthLayout title="Set a new password">
      {token === '' || deadLink ? (
        <div className="flex flex-col gap-4">
          <Notice tone="alarm">
            {deadLink ? confirm.error?.message : 'This page needs the link from the mail we sent. Open the link from the mail again, or ask for a new one.'}
          </Notice>
          {newLink}
        </div>
      ) : (
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
          {confirm.isError ? <Notice tone="alarm">{confirm.error.message}</Notice> : null}
          <TextField label="New password" type="password" autoComplete="new-password" hint="At least 10 characters; not a well-known password or your e-mail"
            error={form.formState.errors.password?.message} {...form.register('password')} />
          <Button type="submit" busy={confirm.isPending}>Set the new password</Button>
        </form>
      )}
      <p className="mt-6 text-ink-soft">
        <Link to={paths.signIn} className="font-semibold text-copper-700 underline">Back to sign-in</Link>
      </p>
    </AuthLayout>
  );
}
