import type { Metadata, Viewport } from 'next';
import './globals.css';
import { textFace, figuresFace } from './fonts';
import { ServiceWorkerRegistration } from '@/components/shell/service-worker-registration';
import { UpdatePrompt } from '@/components/shell/update-prompt';

export const metadata: Metadata = {
  title: { default: 'Ebbcast', template: '%s · Ebbcast' },
  description: 'Offline-first outbreak field tool: daily tallies, epidemic curves, SIR-family forecasts and situation reports.',
  manifest: '/manifest.webmanifest',
  icons: { icon: '/icons/icon-192.png', apple: '/icons/icon-192.png' },
};

export const viewport: Viewport = { themeColor: '#1F6F78', width: 'device-width', initialScale: 1 };

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={`${textFace.variable} ${figuresFace.variable}`}>
      <body className="min-h-screen bg-paper text-ink antialiased">
        {children}
        <ServiceWorkerRegistration />
        <UpdatePrompt />
      </body>
    </html>
  );
}
