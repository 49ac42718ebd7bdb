import type { Metadata } from 'next';
import { ForgotForm } from '@/components/mail/forgot-form';

export const metadata: Metadata = { title: 'Forgot password' };

export default function ForgotPage() {
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-6 px-4 py-10">
      <h1 className="text-3xl">Forgot your password?</h1>
      <p>Enter the e-mail address of your Ebbcast account. If it has an active account, a link to choose a new password is sent to it; the link works once, for one hour.</p>
      <ForgotForm />
    </main>
  );
}
