import type { Metadata } from 'next';
import { FieldHome } from '@/components/field/field-home';

export const metadata: Metadata = { title: 'Field home' };

export default function FieldHomePage() {
  return <FieldHome />;
}
