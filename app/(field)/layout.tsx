import { AppShell } from '@/components/shell/app-shell';

/** Field screens: static client shells that open offline and read their data on the client. */
export default function FieldLayout({ children }: { children: React.ReactNode }) {
  return <AppShell>{children}</AppShell>;
}
