import type { Metadata } from 'next';
import { ForecastScreen } from '@/components/forecast/forecast-screen';

export const metadata: Metadata = { title: 'Forecast' };

/** A static client shell: tallies, fit and forecast are read and computed on the device (?outbreak=). */
export default function ForecastPage() {
  return <ForecastScreen />;
}
