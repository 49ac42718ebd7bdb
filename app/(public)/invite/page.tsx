import type { Metadata } from 'next';
import { Suspense } from 'react';
import { SetPasswordForm } from '@/components/mail/set-password-form';

export const metadata: Metadata = { title: 'Activate your account' };

export default function InvitePage() {
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-6 px-4 py-10">
      <h1 className="text-3xl">Welcome to Ebbcast</h1>
      <p>You were invited to an Ebbcast response. Choose a password to activate your account.</p>
      <Suspense fallback={<p>Checking the link…</p>}>
        <SetPasswordForm kind="invite" />
      </Suspense>
    </main>
  );
}
