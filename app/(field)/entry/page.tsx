import type { Metadata } from 'next';
import { TallyEntry } from '@/components/tallies/tally-entry';

export const metadata: Metadata = { title: 'Record tallies' };

/** Static client shell: the outbreak comes from `?outbreak=`, data through lib/data hooks. */
export default function EntryPage() {
  return <TallyEntry />;
}
