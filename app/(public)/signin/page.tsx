import type { Metadata } from 'next';
import { Suspense } from 'react';
import { SignInForm } from '@/components/auth/sign-in-form';

export const metadata: Metadata = { title: 'Sign in' };

export default function SignInPage() {
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-6 px-4 py-10">
      <h1 className="text-3xl">Sign in to Ebbcast</h1>
      <Suspense fallback={null}>
        <SignInForm />
      </Suspense>
      <p className="text-sm text-ink/70">
        After one sign-in with a network, this device keeps working offline: tallies and scenarios stay on the tablet and
        sync when the network is back.
      </p>
    </main>
  );
}
