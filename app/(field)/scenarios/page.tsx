import type { Metadata } from 'next';
import { ScenarioScreen } from '@/components/scenarios/scenario-screen';

export const metadata: Metadata = { title: 'Scenarios' };

/** A static client shell: everything is read and computed on the device (?outbreak=, ?id=). */
export default function ScenariosPage() {
  return <ScenarioScreen />;
}
