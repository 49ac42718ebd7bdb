import type { Metadata } from 'next';
import { TalliesScreen } from '@/components/tallies/tallies-screen';

export const metadata: Metadata = { title: 'Tallies & curve' };

/** Static client shell: the outbreak comes from `?outbreak=`, data through lib/data hooks. */
export default function TalliesPage() {
  return <TalliesScreen />;
}
