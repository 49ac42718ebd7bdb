import type { Metadata } from 'next';
import { OutbreakOverview } from '@/components/overview/outbreak-overview';

export const metadata: Metadata = { title: 'Overview' };

export default function OverviewPage() {
  return <OutbreakOverview />;
}
