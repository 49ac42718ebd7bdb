import type { Metadata } from 'next';
import { Suspense } from 'react';
import { SetPasswordForm } from '@/components/mail/set-password-form';

export const metadata: Metadata = { title: 'Choose a new password' };

export default function ResetPage() {
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-6 px-4 py-10">
      <h1 className="text-3xl">Choose a new password</h1>
      <Suspense fallback={<p>Checking the link…</p>}>
        <SetPasswordForm kind="reset" />
      </Suspense>
    </main>
  );
}
