import type { MetadataRoute } from 'next';

/** The installable-app manifest (served at /manifest.webmanifest). */
export default function manifest(): MetadataRoute.Manifest {
  return {
    name: 'Ebbcast — outbreak field tool',
    short_name: 'Ebbcast',
    description: 'Daily tallies, epidemic curves, forecasts and sync for outbreak field teams, offline first.',
    start_url: '/field',
    scope: '/',
    display: 'standalone',
    orientation: 'any',
    background_color: '#F7F4EC',
    theme_color: '#1F6F78',
    icons: [
      { src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
      { src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
      { src: '/icons/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
    ],
  };
}
